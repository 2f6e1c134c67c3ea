/**
 * One die as its owner sees it: the shots over time, halves, service plan state, service history
 * with the summaries the plant shared, shared photos and the number of open bookings. Internal
 * notes, findings, hours, parts, people and other customers' orders never leave this module.
 */
import { sql } from 'kysely';
import type { DB } from '../db/connect';
import type { JobHalf } from '../db/schema-toolroom';
import { cumulativeShotSeries, findDie } from '../dies/die-detail';
import { sortWorstFirst, viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';
import { sharedSummary } from './portfolio';
import { loadServiceHistory } from './service-history';

/** The owner's die or undefined: another owner's die is the same as no die (the route says 404). */
export function findOwnerDie(db: DB, customerId: number, number: string) {
	return findDie(db, number, { customerId });
}
export type OwnerDie = NonNullable<Awaited<ReturnType<typeof findOwnerDie>>>;

export interface OwnerJob {
	number: string;
	kind: string;
	half: JobHalf;
	openedAt: string;
	closedAt: string | null;
	/** 'done' or still being worked on; cancelled jobs are not the owner's history. */
	finished: boolean;
	billable: boolean;
	summary: string | null;
}

/** Toolroom jobs of a die in owner words, newest first; cancelled jobs are left out. */
export async function listOwnerJobs(db: DB, dieId: number): Promise<OwnerJob[]> {
	const rows = await db
		.selectFrom('toolroom_jobs')
		.select([
			'number',
			'kind',
			'half',
			'status',
			'opened_at',
			'closed_at',
			'billable_to_owner',
			'owner_summary',
			'summary_shared'
		])
		.where('die_id', '=', dieId)
		.where('status', '!=', 'cancelled')
		.where('voided_at', 'is', null)
		.orderBy('opened_at', 'desc')
		.orderBy('id', 'desc')
		.execute();
	return rows.map((r) => ({
		number: r.number,
		kind: r.kind,
		half: r.half,
		openedAt: r.opened_at,
		closedAt: r.closed_at,
		finished: r.status === 'done',
		billable: r.billable_to_owner === 1,
		summary: sharedSummary(r)
	}));
}

/** Photos the plant shared with the owner; the public id is the only handle on them. */
export async function listSharedPhotos(db: DB, dieId: number) {
	return db
		.selectFrom('photos')
		.leftJoin('toolroom_jobs', 'toolroom_jobs.id', 'photos.job_id')
		.select([
			'photos.public_id as publicId',
			'photos.caption',
			'photos.width',
			'photos.height',
			'photos.uploaded_at as uploadedAt',
			'toolroom_jobs.number as jobNumber'
		])
		.where('photos.die_id', '=', dieId)
		.where('photos.shared_with_owner', '=', 1)
		.orderBy('photos.uploaded_at', 'desc')
		.orderBy('photos.id', 'desc')
		.execute();
}

/**
 * How many bookings of the die are still to come or running (not cancelled, not yet ended): a
 * count only, because the bookings are other customers' orders on shared presses.
 */
export async function countOpenBookings(db: DB, dieId: number, asOf = nowIso()) {
	const row = await db
		.selectFrom('press_bookings')
		.select((eb) => eb.fn.countAll<number>().as('n'))
		.where('die_id', '=', dieId)
		.where('cancelled_at', 'is', null)
		.where('ends_at', '>', asOf)
		.executeTakeFirstOrThrow();
	return Number(row.n);
}

export interface MonthRow {
	/** YYYY-MM (plant months). */
	month: string;
	shots: number;
	/** Days with shots counted in the month. */
	daysRun: number;
	/** Die total at the end of the month. */
	totalAtEnd: number;
}

/**
 * Shots by month from the daily roll-up, oldest first, with the die total at each month's end
 * counted backwards from the kept total (as the chart does), so the last row always shows the
 * total the register shows.
 */
export async function monthlyLedger(
	db: DB,
	dieId: number,
	totalShots: number
): Promise<MonthRow[]> {
	const rows = await db
		.selectFrom('shot_daily')
		.select([
			sql<string>`substr(day, 1, 7)`.as('month'),
			sql<number>`sum(shots)`.as('shots'),
			sql<number>`sum(case when shots <> 0 then 1 else 0 end)`.as('daysRun')
		])
		.where('die_id', '=', dieId)
		.groupBy(sql`substr(day, 1, 7)`)
		.orderBy('month', 'desc')
		.execute();
	let running = totalShots;
	const result: MonthRow[] = [];
	for (const r of rows) {
		result.push({
			month: r.month,
			shots: Number(r.shots),
			daysRun: Number(r.daysRun),
			totalAtEnd: running
		});
		running -= Number(r.shots);
	}
	return result.reverse();
}

/** Everything the owner's die page shows, queried together. */
export async function getOwnerDieStory(db: DB, die: OwnerDie, asOf = nowIso()) {
	const [series, months, halves, tasks, jobs, photos, openBookings, history] = await Promise.all([
		cumulativeShotSeries(db, die.id, die.total_shots),
		monthlyLedger(db, die.id, die.total_shots),
		db
			.selectFrom('die_halves')
			.select(['side', 'serial', 'shots', 'installed_at', 'removed_at', 'active'])
			.where('die_id', '=', die.id)
			.orderBy('active', 'desc')
			.orderBy('side')
			.orderBy('installed_at', 'desc')
			.execute(),
		db
			.selectFrom('service_tasks')
			.select(['id', 'kind', 'interval_shots', 'interval_days', 'last_done_at', 'last_done_shots'])
			.where('die_id', '=', die.id)
			.where('active', '=', 1)
			.execute(),
		listOwnerJobs(db, die.id),
		listSharedPhotos(db, die.id),
		countOpenBookings(db, die.id, asOf),
		loadServiceHistory(db, die.id)
	]);
	const plan =
		die.status === 'retired'
			? []
			: sortWorstFirst(tasks.map((t) => viewServiceTask(t, die.total_shots, asOf))).map((t) => ({
					kind: t.kind,
					state: t.state,
					lastDoneAt: t.lastDoneAt,
					shotsRemaining: t.shotsRemaining,
					daysRemaining: t.daysRemaining
				}));
	return { series, months, halves, plan, jobs, photos, openBookings, history };
}
