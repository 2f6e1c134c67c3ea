import { sql } from 'kysely';
import { plantDate, plantNoon } from '../../plant-time';
import type { DB } from '../db/connect';
import { nowIso } from '../time';
import { loadDieLife, type DieLife } from './life';
import type { DieScope } from './register';
import { sortWorstFirst, viewServiceTask } from './service-summary';
import { historyRecordKey } from '../../history';

/** Finds a die by number within the caller's scope; another owner's die is simply not found. */
export async function findDie(db: DB, number: string, scope: DieScope) {
	return db
		.selectFrom('dies')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.selectAll('dies')
		.select([
			'customers.code as customerCode',
			'customers.name as customerName',
			'alloys.code as alloyCode',
			'alloys.name as alloyName',
			'alloys.family',
			sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`.as(
				'expectedLifeShots'
			)
		])
		.where('dies.number', '=', number.toUpperCase())
		.$if(scope.customerId !== null, (q) => q.where('dies.customer_id', '=', scope.customerId!))
		.executeTakeFirst();
}
export type FoundDie = NonNullable<Awaited<ReturnType<typeof findDie>>>;

const DAY_MS = 86_400_000;

/** Daily shots of the trailing window, from the roll-up (never the ledger). */
export async function recentDailyShots(db: DB, dieId: number, asOf: string, days = 28) {
	const from = plantDate(Date.parse(asOf) - days * DAY_MS);
	const rows = await db
		.selectFrom('shot_daily')
		.select(['day', 'shots'])
		.where('die_id', '=', dieId)
		// From the day that holds the window's start; lifeStatus keeps only what lies inside it.
		.where('day', '>=', from)
		.execute();
	return rows.map((r) => ({ at: plantNoon(r.day), shots: r.shots }));
}

/**
 * The die's life used, shots remaining and projected end of life — those of its most-worn active
 * half (dies/life.ts, the one definition).
 */
export function dieLife(db: DB, die: Pick<FoundDie, 'id'>, asOf = nowIso()): Promise<DieLife> {
	return loadDieLife(db, die.id, asOf);
}

/** Cumulative shots by day, built backwards from the kept total so the ledger is never summed. */
export async function cumulativeShotSeries(db: DB, dieId: number, totalShots: number) {
	const days = await db
		.selectFrom('shot_daily')
		.select(['day', 'shots'])
		.where('die_id', '=', dieId)
		.orderBy('day', 'desc')
		.execute();
	let running = totalShots;
	const points: { day: string; total: number }[] = [];
	for (const d of days) {
		points.push({ day: d.day, total: running });
		running -= d.shots;
	}
	return points.reverse();
}

/** Voided inspections, cooling checks and jobs of a die, keyed as history entries name them. */
async function listVoidedRecords(db: DB, dieId: number): Promise<Map<string, string>> {
	const [checks, inspections, jobs] = await Promise.all([
		db
			.selectFrom('cooling_checks')
			.select(['id', 'void_reason'])
			.where('die_id', '=', dieId)
			.where('voided_at', 'is not', null)
			.execute(),
		db
			.selectFrom('surface_inspections')
			.select(['id', 'void_reason'])
			.where('die_id', '=', dieId)
			.where('voided_at', 'is not', null)
			.execute(),
		db
			.selectFrom('toolroom_jobs')
			.select(['number', 'void_reason'])
			.where('die_id', '=', dieId)
			.where('voided_at', 'is not', null)
			.execute()
	]);
	return new Map([
		...checks.map((r) => [`check:${r.id}`, r.void_reason ?? ''] as const),
		...inspections.map((r) => [`inspection:${r.id}`, r.void_reason ?? ''] as const),
		...jobs.map((r) => [`job:${r.number}`, r.void_reason ?? ''] as const)
	]);
}

/** Everything the die page shows, queried together. */
export async function getDieStory(db: DB, die: FoundDie, asOf = nowIso()) {
	const [halves, tasks, entries, history, voided] = await Promise.all([
		db
			.selectFrom('die_halves')
			.selectAll()
			.where('die_id', '=', die.id)
			.orderBy('active', 'desc')
			.orderBy('side')
			.orderBy('installed_at', 'desc')
			.execute(),
		db
			.selectFrom('service_tasks')
			.selectAll()
			.where('die_id', '=', die.id)
			.where('active', '=', 1)
			.execute(),
		db
			.selectFrom('shot_entries')
			.leftJoin('machines', 'machines.id', 'shot_entries.machine_id')
			.leftJoin('users', 'users.id', 'shot_entries.entered_by')
			.select([
				'shot_entries.id',
				'shot_entries.counted_at as countedAt',
				'shot_entries.shots',
				'shot_entries.source',
				'shot_entries.note',
				'shot_entries.counter_start as counterStart',
				'shot_entries.counter_end as counterEnd',
				'machines.name as machineName',
				'users.name as enteredBy'
			])
			.where('shot_entries.die_id', '=', die.id)
			.orderBy('shot_entries.counted_at', 'desc')
			.orderBy('shot_entries.id', 'desc')
			.limit(15)
			.execute(),
		db
			.selectFrom('audit_log')
			.leftJoin('users', 'users.id', 'audit_log.user_id')
			.select([
				'audit_log.id',
				'audit_log.at',
				'audit_log.action',
				'audit_log.detail',
				'users.name as userName'
			])
			.where('audit_log.die_id', '=', die.id)
			// Time order, newest first; entries of the same instant in the order they were made.
			.orderBy('audit_log.at', 'desc')
			.orderBy('audit_log.id', 'desc')
			.limit(30)
			.execute(),
		listVoidedRecords(db, die.id)
	]);
	return {
		halves,
		tasks: sortWorstFirst(tasks.map((t) => viewServiceTask(t, die.total_shots, asOf))),
		entries,
		history: history.map((h) => {
			const entry = { ...h, detail: JSON.parse(h.detail) as Record<string, unknown> };
			const key = historyRecordKey(entry);
			// An entry about a record voided since is shown struck through, with the reason.
			return { ...entry, voidReason: key ? (voided.get(key) ?? null) : null };
		})
	};
}
