/**
 * The tooling one customer owns, as the owner portal shows it: life, projected end of life, the
 * next service task and the last toolroom job in owner words. Everything here is scoped by the
 * customer id first; nothing of another owner can come out of these functions.
 */
import { sql } from 'kysely';
import { TRAILING_RATE_DAYS } from '../../calc/life';
import { dieLifeOf, lifeExpectedSql, lifeShotsSql, lifeSideSql } from '../dies/life';
import { serviceStateRank } from '../../calc/service';
import type { DieStatus } from '../../domain';
import type { OwnerDieQuery } from '../../schemas/owner';
import type { DB } from '../db/connect';
import { worstTasks } from '../dies/register';
import type { ServiceTaskView } from '../dies/service-summary';
import { plantDate, plantNoon } from '../../plant-time';
import { nowIso } from '../time';

const DAY_MS = 86_400_000;

/** What the owner may read of the last finished toolroom job on a die. */
export interface OwnerLastJob {
	closedAt: string;
	kind: string;
	/** The summary the plant marked as shared; null when nothing was shared. */
	summary: string | null;
}

export interface OwnerDieRow {
	id: number;
	number: string;
	partName: string;
	partNumber: string | null;
	status: DieStatus;
	alloyName: string;
	family: string;
	totalShots: number;
	expectedLifeShots: number;
	lifeUsedPct: number;
	shotsRemaining: number;
	/** Trailing 28-day rate, shots per day. */
	shotsPerDay: number;
	/** Shots counted in the trailing 28 days. */
	shotsLast28Days: number;
	/** Date the die reaches expected life at its recent rate; null when retired or idle. */
	projectedEndOfLife: string | null;
	retiredAt: string | null;
	nextService: Pick<ServiceTaskView, 'kind' | 'state' | 'fraction'> | null;
	lastJob: OwnerLastJob | null;
}

export interface OwnerTotals {
	dies: number;
	inService: number;
	retired: number;
	totalShots: number;
	shotsLast28Days: number;
	/** In service and at 90 % of expected life or more. */
	nearReplacement: number;
	/** In service with a service task due or overdue. */
	serviceDue: number;
	/** Earliest projected end of life among dies in service, with its die. */
	nextReplacement: { number: string; date: string } | null;
}

/** The shared text of a job, when the plant shared one that is not blank. */
export function sharedSummary(job: { owner_summary: string | null; summary_shared: number }) {
	const text = job.summary_shared === 1 ? job.owner_summary?.trim() : '';
	return text ? text : null;
}

/** One line about the last job: the shared summary, or only the date, never the internals. */
export function describeLastJob(job: OwnerLastJob | null): string {
	if (!job) return '';
	return job.summary ?? `Serviced on ${plantDate(job.closedAt)}`;
}

/** The window `dieLife` uses: days after (asOf − 28 d), so both give the same rate. */
function windowStartDay(asOf: string) {
	return plantDate(Date.parse(asOf) - TRAILING_RATE_DAYS * DAY_MS);
}

/**
 * Every die of one customer with life, projected end of life, next service and last job, in four
 * queries whatever the number of dies (the trailing shots of all dies come in one read of the
 * daily roll-up). Sorted by die number.
 */
export async function loadOwnerDies(
	db: DB,
	customerId: number,
	asOf = nowIso()
): Promise<OwnerDieRow[]> {
	const [dies, daily, lastJobs] = await Promise.all([
		db
			.selectFrom('dies')
			.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
			.select([
				'dies.id',
				'dies.number',
				'dies.part_name as partName',
				'dies.part_number as partNumber',
				'dies.status',
				'dies.total_shots as totalShots',
				'dies.retired_at as retiredAt',
				'alloys.name as alloyName',
				'alloys.family',
				sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`.as(
					'expectedLifeShots'
				),
				lifeShotsSql.as('lifeShots'),
				lifeExpectedSql.as('lifeExpectedShots'),
				lifeSideSql.as('lifeSide')
			])
			.where('dies.customer_id', '=', customerId)
			.orderBy('dies.number')
			.execute(),
		db
			.selectFrom('shot_daily')
			.innerJoin('dies', 'dies.id', 'shot_daily.die_id')
			.select(['shot_daily.die_id as dieId', 'shot_daily.day', 'shot_daily.shots'])
			.where('dies.customer_id', '=', customerId)
			.where('shot_daily.day', '>', windowStartDay(asOf))
			.execute(),
		db
			.selectFrom('toolroom_jobs as j')
			.innerJoin('dies', 'dies.id', 'j.die_id')
			.select(['j.die_id as dieId', 'j.kind', 'j.closed_at', 'j.owner_summary', 'j.summary_shared'])
			.where('dies.customer_id', '=', customerId)
			.where('j.id', '=', (eb) =>
				eb
					.selectFrom('toolroom_jobs as j2')
					.select('j2.id')
					.whereRef('j2.die_id', '=', 'j.die_id')
					.where('j2.status', '=', 'done')
					.where('j2.voided_at', 'is', null)
					.orderBy('j2.closed_at', 'desc')
					.orderBy('j2.id', 'desc')
					.limit(1)
			)
			.execute()
	]);
	const tasks = await worstTasks(
		db,
		dies.map((d) => ({ id: d.id, totalShots: d.totalShots })),
		asOf
	);
	const recentByDie = new Map<number, { at: string; shots: number }[]>();
	for (const r of daily) {
		const list = recentByDie.get(r.dieId) ?? [];
		list.push({ at: plantNoon(r.day), shots: r.shots });
		recentByDie.set(r.dieId, list);
	}
	const jobByDie = new Map(lastJobs.map((j) => [j.dieId, j]));

	return dies.map(({ lifeShots, lifeExpectedShots, lifeSide, ...d }) => {
		const recent = recentByDie.get(d.id) ?? [];
		const windowShots = recent.reduce((s, r) => s + r.shots, 0);
		// Life follows the steel: the most-worn active half (dies/life.ts), at the die's rate.
		const life = dieLifeOf(
			{ lifeShots, lifeExpectedShots, lifeSide },
			Math.max(0, windowShots) / TRAILING_RATE_DAYS,
			asOf
		);
		const retired = d.status === 'retired';
		const task = retired ? undefined : tasks.get(d.id);
		const job = jobByDie.get(d.id);
		return {
			...d,
			lifeUsedPct: life.lifeUsedPct,
			shotsRemaining: life.shotsRemaining,
			shotsPerDay: life.shotsPerDay,
			shotsLast28Days: windowShots,
			projectedEndOfLife: retired ? null : life.projectedEndOfLife,
			nextService: task ? { kind: task.kind, state: task.state, fraction: task.fraction } : null,
			lastJob:
				job && job.closed_at
					? { closedAt: job.closed_at, kind: job.kind, summary: sharedSummary(job) }
					: null
		};
	});
}

export function summariseOwnerDies(rows: OwnerDieRow[]): OwnerTotals {
	const inService = rows.filter((r) => r.status !== 'retired');
	let nextReplacement: OwnerTotals['nextReplacement'] = null;
	for (const r of inService) {
		if (r.projectedEndOfLife && (!nextReplacement || r.projectedEndOfLife < nextReplacement.date)) {
			nextReplacement = { number: r.number, date: r.projectedEndOfLife };
		}
	}
	return {
		dies: rows.length,
		inService: inService.length,
		retired: rows.length - inService.length,
		totalShots: rows.reduce((s, r) => s + r.totalShots, 0),
		shotsLast28Days: rows.reduce((s, r) => s + r.shotsLast28Days, 0),
		nearReplacement: inService.filter((r) => r.lifeUsedPct >= 90).length,
		serviceDue: inService.filter(
			(r) => r.nextService && (r.nextService.state === 'due' || r.nextService.state === 'overdue')
		).length,
		nextReplacement
	};
}

const STATUS_ORDER: Record<DieStatus, number> = {
	running: 0,
	ready: 1,
	in_toolroom: 2,
	held: 3,
	retired: 4
};

/** Rows without a value (no projection, no service task) go last in either direction. */
function compareNullable<T>(a: T | null, b: T | null, cmp: (x: T, y: T) => number, dir: number) {
	if (a === null && b === null) return 0;
	if (a === null) return 1;
	if (b === null) return -1;
	return dir * cmp(a, b);
}

const byText = (a: string, b: string) => a.localeCompare(b, 'en');
const byNumber = (a: number, b: number) => a - b;

function compareRows(a: OwnerDieRow, b: OwnerDieRow, sort: OwnerDieQuery['sort'], dir: number) {
	switch (sort) {
		case 'part':
			return dir * byText(a.partName, b.partName);
		case 'status':
			return dir * (STATUS_ORDER[a.status] - STATUS_ORDER[b.status]);
		case 'shots':
			return dir * (a.totalShots - b.totalShots);
		case 'life':
			return dir * (a.lifeUsedPct - b.lifeUsedPct);
		case 'eol':
			return compareNullable(a.projectedEndOfLife, b.projectedEndOfLife, byText, dir);
		case 'service':
			// Ascending puts the worst first: that is what an owner sorting by service wants.
			return compareNullable(
				a.nextService,
				b.nextService,
				(x, y) =>
					byNumber(serviceStateRank(y.state), serviceStateRank(x.state)) ||
					byNumber(y.fraction, x.fraction),
				dir
			);
		default:
			return 0;
	}
}

/** Search, filter, sort and one page of the owner's dies (in memory: one owner's dies are few). */
export function pageOwnerDies(rows: OwnerDieRow[], query: OwnerDieQuery) {
	const needle = query.q.toLowerCase();
	const filtered = rows.filter(
		(r) =>
			(!needle ||
				r.number.toLowerCase().includes(needle) ||
				r.partName.toLowerCase().includes(needle) ||
				(r.partNumber ?? '').toLowerCase().includes(needle)) &&
			(query.status === '' || (query.status === 'retired') === (r.status === 'retired'))
	);
	const dir = query.dir === 'desc' ? -1 : 1;
	const sorted = filtered.sort(
		(a, b) => compareRows(a, b, query.sort, dir) || byText(a.number, b.number)
	);
	const start = (query.page - 1) * query.size;
	return { rows: sorted.slice(start, start + query.size), total: filtered.length };
}

/** The customer's name and code, for headings and file names. */
export async function findOwnerCustomer(db: DB, customerId: number) {
	return db
		.selectFrom('customers')
		.select(['id', 'code', 'name'])
		.where('id', '=', customerId)
		.executeTakeFirst();
}
