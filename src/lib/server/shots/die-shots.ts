import { sql } from 'kysely';
import { plantDate } from '../../plant-time';
import type { DB } from '../db/connect';
import { cumulativeShotSeries, type FoundDie } from '../dies/die-detail';
import { listHalfLives } from '../dies/life';

export interface ChartEvent {
	day: string;
	kind: 'service' | 'half';
	label: string;
}

/** At most this many points go to the chart; one per day is far more than a screen can show. */
const MAX_POINTS = 400;

/** Keeps the last point of each bucket, so the curve still ends on the kept total. */
export function thinSeries<T>(points: T[], max = MAX_POINTS): T[] {
	if (points.length <= max) return points;
	const step = points.length / max;
	const out: T[] = [];
	for (let i = 1; i <= max; i++)
		out.push(points[Math.min(points.length, Math.round(i * step)) - 1]);
	if (out[0] !== points[0]) out.unshift(points[0]);
	return out;
}

/** Shots per calendar month from the daily roll-up, newest month first. */
export async function monthlyShotTotals(db: DB, dieId: number) {
	return db
		.selectFrom('shot_daily')
		.select([sql<string>`substr(day, 1, 7)`.as('month'), sql<number>`sum(shots)`.as('shots')])
		.where('die_id', '=', dieId)
		.groupBy(sql`substr(day, 1, 7)`)
		.orderBy(sql`substr(day, 1, 7)`, 'desc')
		.execute();
}

/**
 * The newest ledger entries of one die, with who or what counted them, their review and void
 * state — plus every entry still waiting for review, however old, so none is out of sight.
 */
export async function latestDieEntries(db: DB, dieId: number, limit = 20) {
	const [latest, waiting] = await Promise.all([
		dieEntries(db, dieId).limit(limit).execute(),
		dieEntries(db, dieId)
			.where('e.review_state', '=', 'to_review')
			.where('e.voided_at', 'is', null)
			.execute()
	]);
	const seen = new Set(latest.map((e) => e.id));
	return [...latest, ...waiting.filter((e) => !seen.has(e.id))];
}

function dieEntries(db: DB, dieId: number) {
	return db
		.selectFrom('shot_entries as e')
		.leftJoin('machines', 'machines.id', 'e.machine_id')
		.leftJoin('users', 'users.id', 'e.entered_by')
		.leftJoin('api_tokens', 'api_tokens.id', 'e.token_id')
		.select([
			'e.id',
			'e.counted_at as countedAt',
			'e.shots',
			'e.counter_start as counterStart',
			'e.counter_end as counterEnd',
			'e.source',
			'e.note',
			'machines.name as press',
			'users.name as enteredBy',
			'api_tokens.name as token',
			'e.warning',
			'e.review_state as reviewState',
			'e.review_reason as reviewReason',
			'e.voided_at as voidedAt',
			'e.void_reason as voidReason',
			'e.reset_reason as resetReason',
			'e.replaces_id as replacesId'
		])
		.where('e.die_id', '=', dieId)
		.orderBy('e.counted_at', 'desc')
		.orderBy('e.id', 'desc');
}

/** Everything the "Shots & halves" tab shows, queried together; nothing sums the ledger. */
export async function getDieShotsView(db: DB, die: FoundDie) {
	const [series, months, entries, halves, tasks] = await Promise.all([
		cumulativeShotSeries(db, die.id, die.total_shots),
		monthlyShotTotals(db, die.id),
		latestDieEntries(db, die.id),
		listHalfLives(db, die.id),
		db
			.selectFrom('service_tasks')
			.select(['kind', 'last_done_at', 'last_done_shots'])
			.where('die_id', '=', die.id)
			.where('active', '=', 1)
			.execute()
	]);
	const events: ChartEvent[] = [];
	for (const t of tasks) {
		// A task "done" at 0 shots on the day the die was registered is the plan's start, not a service.
		if (t.last_done_shots > 0) {
			events.push({ day: plantDate(t.last_done_at), kind: 'service', label: t.kind });
		}
	}
	for (const h of halves) {
		if (h.dieShotsAtInstall > 0) {
			events.push({
				day: plantDate(h.installedAt),
				kind: 'half',
				label: `${h.side}:${h.serial}`
			});
		}
	}
	events.sort((a, b) => a.day.localeCompare(b.day));
	return { series: thinSeries(series), months, entries, halves, events };
}
