/** The toolroom board: open jobs by status and age, closed jobs by page, CSV rows. */
import type { JobBoardQuery } from '../../schemas/toolroom';
import type { DB } from '../db/connect';
import type { JobStatus } from '../db/schema-toolroom';
import { nowIso } from '../time';
import { jobAgeDays } from './jobs';

const ACTIVE: JobStatus[] = ['open', 'in_progress', 'waiting_parts'];
const CLOSED: JobStatus[] = ['done', 'cancelled'];
export const CLOSED_PAGE_SIZE = 25;

type Filters = Pick<JobBoardQuery, 'status' | 'toolmaker' | 'die'>;

function jobsQuery(db: DB, filters: Filters) {
	return db
		.selectFrom('toolroom_jobs as j')
		.innerJoin('dies', 'dies.id', 'j.die_id')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.leftJoin('users as assignee', 'assignee.id', 'j.assigned_to')
		.$if(!!filters.status, (q) => q.where('j.status', '=', filters.status as JobStatus))
		.$if(!!filters.toolmaker, (q) => q.where('j.assigned_to', '=', filters.toolmaker))
		.$if(!!filters.die, (q) => q.where('dies.number', '=', filters.die));
}

const COLUMNS = [
	'j.id',
	'j.number',
	'j.kind',
	'j.half',
	'j.zone',
	'j.description',
	'j.status',
	'j.opened_at as openedAt',
	'j.closed_at as closedAt',
	'j.hours',
	'j.billable_to_owner as billable',
	'j.cancel_reason as cancelReason',
	'j.voided_at as voidedAt',
	'j.void_reason as voidReason',
	'dies.number as dieNumber',
	'dies.part_name as partName',
	'customers.name as customerName',
	'assignee.name as assigneeName'
] as const;

/** Open, in-progress and waiting jobs matching the filters, oldest first, with age in days. */
export async function listOpenJobs(db: DB, filters: Filters, asOf = nowIso()) {
	if (filters.status && !ACTIVE.includes(filters.status as JobStatus)) return [];
	const rows = await jobsQuery(db, filters)
		.select(COLUMNS)
		.where('j.status', 'in', ACTIVE)
		.orderBy('j.opened_at', 'asc')
		.orderBy('j.id', 'asc')
		.execute();
	return rows.map((r) => ({ ...r, ageDays: jobAgeDays(r.openedAt, asOf) }));
}
export type OpenJobRow = Awaited<ReturnType<typeof listOpenJobs>>[number];

/** Closed and cancelled jobs matching the filters, latest first, one page. */
export async function listClosedJobs(db: DB, filters: Filters, page: number) {
	if (filters.status && !CLOSED.includes(filters.status as JobStatus)) {
		return { rows: [], total: 0 };
	}
	const base = jobsQuery(db, filters).where('j.status', 'in', CLOSED);
	const [count, rows] = await Promise.all([
		base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
		base
			.select(COLUMNS)
			.orderBy('j.closed_at', 'desc')
			.orderBy('j.id', 'desc')
			.limit(CLOSED_PAGE_SIZE)
			.offset((page - 1) * CLOSED_PAGE_SIZE)
			.execute()
	]);
	return { rows, total: Number(count.n) };
}

/** Every job matching the filters (open and closed), for the CSV export. */
export async function listJobsForExport(db: DB, filters: Filters) {
	return jobsQuery(db, filters)
		.select([
			...COLUMNS,
			'j.die_shots_at_open as shotsAtOpen',
			'j.die_shots_at_close as shotsAtClose',
			'j.parts_used as partsUsed'
		])
		.orderBy('j.opened_at', 'desc')
		.orderBy('j.id', 'desc')
		.execute();
}

/** Count and oldest age of the open jobs in each working status, for the toolroom home. */
export async function summariseOpenJobs(db: DB, asOf = nowIso()) {
	const jobs = await listOpenJobs(db, { status: '', toolmaker: '', die: '' }, asOf);
	const byStatus = ACTIVE.map((status) => {
		const rows = jobs.filter((j) => j.status === status);
		return {
			status: status as 'open' | 'in_progress' | 'waiting_parts',
			count: rows.length,
			oldestDays: rows.length ? Math.max(...rows.map((r) => r.ageDays)) : null
		};
	});
	return { byStatus, oldest: [...jobs].sort((a, b) => b.ageDays - a.ageDays).slice(0, 8) };
}

/** The toolmaker's own active jobs (assigned to them), oldest first. */
export async function listMyOpenJobs(db: DB, userId: string, asOf = nowIso()) {
	return listOpenJobs(db, { status: '', toolmaker: userId, die: '' }, asOf);
}

/** Dies standing in the toolroom, longest there first, with their open job when they have one. */
export async function listDiesInToolroom(db: DB) {
	const rows = await db
		.selectFrom('dies')
		.leftJoin('toolroom_jobs as j', (join) =>
			join.onRef('j.die_id', '=', 'dies.id').on('j.status', 'in', ACTIVE)
		)
		.select((eb) => [
			'dies.id',
			'dies.number',
			'dies.part_name as partName',
			'j.number as jobNumber',
			'j.opened_at as jobOpenedAt',
			eb
				.selectFrom('audit_log')
				.select((a) => a.fn.max('audit_log.at').as('at'))
				.whereRef('audit_log.die_id', '=', 'dies.id')
				.where('audit_log.action', '=', 'die.status')
				.as('since')
		])
		.where('dies.status', '=', 'in_toolroom')
		// A die with no recorded status change first, as SQLite sorts nulls; PostgreSQL would put it last.
		.orderBy('since', (ob) => ob.asc().nullsFirst())
		.orderBy('dies.number', 'asc')
		.orderBy('j.opened_at', 'asc')
		.execute();
	// A die with two open jobs appears once, with its oldest job number.
	const seen = new Map<number, (typeof rows)[number]>();
	for (const r of rows) if (!seen.has(r.id)) seen.set(r.id, r);
	return [...seen.values()].map((r) => ({
		id: r.id,
		number: r.number,
		partName: r.partName,
		jobNumber: r.jobNumber,
		since: (r.since as string | null) ?? r.jobOpenedAt
	}));
}
export type DieInToolroom = Awaited<ReturnType<typeof listDiesInToolroom>>[number];
