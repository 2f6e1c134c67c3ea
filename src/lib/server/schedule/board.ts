import { sql } from 'kysely';
import { addDaysToDate } from '../../calc/dates';
import type { AlloyFamily } from '../../calc/life';
import { plantDate } from '../../plant-time';
import type { BoardQuery } from '../../schemas/schedule';
import { lifeExpectedSql, lifeShotsSql, lifeUsedPctOf } from '../dies/life';
import type { DB } from '../db/connect';
import type { DieProcess, DieStatus } from '../db/schema';
import type { DieScope } from '../dies/register';
import { audienceOf, customerMaySeeJob } from '../owner/customer-fields';
import { projectTaskDue, viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';
import { chamberChecks, dieClampRequirement, type Assessment, type Verdict } from './verdict';
import { judgeBookings } from './at-risk';
import { listServiceWindows } from './service-windows';
import { bookingPhase, windowBounds } from './bookings';
import { MAX_BOOKING_DAYS } from '../../schemas/schedule';
import { trailingShotsPerDay, type DieFacts } from './die-facts';
import { findPressByName, listPressOptions } from './presses';
import { listOpenToolroomJobs } from './toolroom-hook';

const DAY_MS = 86_400_000;

// The board answers in compact tables (column names once, rows as arrays) so 2 000 dies and their
// bookings stay a small, fast JSON document. Rows of the other tables point at a die by its index
// in `dies.rows`.

export const BOARD_DIE_COLUMNS = [
	'number',
	'part',
	'owner',
	'family',
	'status',
	'lifeUsedPct'
] as const;
export type BoardDieRow = [string, string, string, AlloyFamily, DieStatus, number];

export const BOARD_BOOKING_COLUMNS = [
	'id',
	'die',
	'press',
	'start',
	'end',
	'order',
	'parts',
	'phase',
	'verdict',
	'why'
] as const;
/**
 * `verdict` is the one verdict (assessRun) on the run as it stands now, for bookings not yet
 * ended (null once ended); `why` is its first reason, shown in the bar's popover.
 */
export type BoardBookingRow = [
	number,
	number,
	string,
	string,
	string,
	string,
	number,
	string,
	Verdict | null,
	string | null
];

/** Service windows of the dies shown (plant callers only). */
export const BOARD_WINDOW_COLUMNS = ['die', 'id', 'start', 'end', 'kind', 'note', 'job'] as const;
export type BoardWindowRow = [number, number, string, string, string, string | null, string | null];

export const BOARD_JOB_COLUMNS = ['die', 'number', 'kind', 'status', 'openedAt'] as const;
export type BoardJobRow = [number, string, string, string, string];

export const BOARD_SERVICE_COLUMNS = ['die', 'day', 'kind', 'state'] as const;
export type BoardServiceRow = [number, string, string, string];

/** Dies counting on a press right now (counts from the press gateway or the API). */
export const BOARD_LIVE_COLUMNS = ['die', 'press', 'lastCountedAt'] as const;
export type BoardLiveRow = [number, string, string];

export interface BoardData {
	from: string;
	/** Day after the last day shown. */
	to: string;
	days: number;
	today: string;
	generatedAt: string;
	press: { name: string; chamber: 'hot' | 'cold'; clampKn: number } | null;
	dies: { columns: typeof BOARD_DIE_COLUMNS; rows: BoardDieRow[] };
	bookings: { columns: typeof BOARD_BOOKING_COLUMNS; rows: BoardBookingRow[] };
	jobs: { columns: typeof BOARD_JOB_COLUMNS; rows: BoardJobRow[] };
	service: { columns: typeof BOARD_SERVICE_COLUMNS; rows: BoardServiceRow[] };
	live: { columns: typeof BOARD_LIVE_COLUMNS; rows: BoardLiveRow[] };
	windows: { columns: typeof BOARD_WINDOW_COLUMNS; rows: BoardWindowRow[] };
}

/** Monday of the plant week holding `iso` — the board's default first day. */
export function startOfWeek(iso: string): string {
	const day = new Date(Date.parse(plantDate(iso)));
	const back = (day.getUTCDay() + 6) % 7;
	return new Date(day.getTime() - back * DAY_MS).toISOString().slice(0, 10);
}

/** Filter choices for the board's skeleton page (server-rendered before the data arrives). */
export async function loadBoardFilters(db: DB, scope: DieScope) {
	const [owners, presses] = await Promise.all([
		db
			.selectFrom('customers')
			.select(['code', 'name'])
			.$if(scope.customerId !== null, (q) => q.where('id', '=', scope.customerId!))
			.orderBy('name')
			.execute(),
		listPressOptions(db)
	]);
	return { owners, presses };
}

/**
 * The board's lean booking query: only what a bar shows (the die rows carry the rest). The
 * lower bound on starts_at comes from the longest booking allowed, so the (starts_at, ends_at)
 * index answers the window without reading other rows.
 */
async function listBoardBookings(db: DB, start: string, end: string) {
	const earliest = new Date(Date.parse(start) - MAX_BOOKING_DAYS * DAY_MS).toISOString();
	return db
		.selectFrom('press_bookings as b')
		.innerJoin('machines', 'machines.id', 'b.machine_id')
		.innerJoin('dies', 'dies.id', 'b.die_id')
		.select([
			'b.id',
			'b.die_id',
			'b.machine_id',
			'dies.number as dieNumber',
			'dies.customer_id as dieCustomerId',
			'machines.name as pressName',
			'b.starts_at',
			'b.ends_at',
			'b.order_ref',
			'b.parts',
			'b.scrap_pct',
			'b.shots_per_hour',
			'b.cancelled_at'
		])
		.where('b.starts_at', '>=', earliest)
		.where('b.starts_at', '<', end)
		.where('b.ends_at', '>', start)
		.where('b.cancelled_at', 'is', null)
		.orderBy('b.starts_at')
		.execute();
}

interface DieBase {
	id: number;
	number: string;
	part_name: string;
	owner: string;
	family: AlloyFamily;
	status: DieStatus;
	process: DieProcess;
	projected_area_cm2: number;
	has_slides: number;
	total_shots: number;
	expectedLife: number;
	lifeShots: number;
	lifeExpectedShots: number;
	alloyCode: string;
}

/**
 * The availability board for a window: active dies (filtered by owner, family and — for a press —
 * those that fit it by chamber and clamping force), their bookings, open toolroom jobs and the
 * projected due dates of their service tasks at the trailing shot rate (calc/service).
 */
export async function loadBoard(
	db: DB,
	query: BoardQuery,
	scope: DieScope,
	now = nowIso()
): Promise<BoardData> {
	const audience = audienceOf(scope);
	const today = plantDate(now);
	const from = query.from ?? startOfWeek(now);
	const to = addDaysToDate(from, query.days);
	const { start, end } = windowBounds(from, addDaysToDate(from, query.days - 1));

	const [press, allDies] = await Promise.all([
		query.press ? findPressByName(db, query.press) : Promise.resolve(undefined),
		db
			.selectFrom('dies')
			.innerJoin('customers', 'customers.id', 'dies.customer_id')
			.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
			.select([
				'dies.id',
				'dies.number',
				'dies.part_name',
				'customers.code as owner',
				'alloys.family',
				'alloys.code as alloyCode',
				'dies.status',
				'dies.process',
				'dies.projected_area_cm2',
				'dies.has_slides',
				'dies.total_shots',
				sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`.as(
					'expectedLife'
				),
				lifeShotsSql.as('lifeShots'),
				lifeExpectedSql.as('lifeExpectedShots')
			])
			.where('dies.status', '!=', 'retired')
			.$if(scope.customerId !== null, (q) => q.where('dies.customer_id', '=', scope.customerId!))
			.$if(!!query.owner, (q) => q.where('customers.code', '=', query.owner))
			.$if(!!query.family, (q) => q.where('alloys.family', '=', query.family as AlloyFamily))
			.orderBy('dies.number')
			.execute() as Promise<DieBase[]>
	]);

	let dies = allDies;
	if (press) {
		// Dies that could run on the press: right chamber and alloy, enough clamping force.
		dies = allDies.filter((d) => {
			const facts = {
				number: d.number,
				family: d.family,
				alloyCode: d.alloyCode,
				process: d.process,
				projectedAreaCm2: d.projected_area_cm2,
				hasSlides: d.has_slides === 1
			} as DieFacts;
			const blocked = chamberChecks(facts, press).some((c) => c.level === 'block');
			return !blocked && dieClampRequirement(facts).requiredKn <= press.clamp_force_kn;
		});
	}
	const index = new Map(dies.map((d, i) => [d.id, i]));
	const ids = dies.map((d) => d.id);

	const [live, bookings, jobs, tasks, rates, windows] = await Promise.all([
		db
			.selectFrom('press_feed as f')
			.innerJoin('machines as m', 'm.id', 'f.machine_id')
			.innerJoin('dies as d', 'd.id', 'f.die_id')
			.select(['f.die_id', 'm.name', 'f.last_counted_at'])
			.where('d.status', '=', 'running')
			.execute(),
		listBoardBookings(db, start, end),
		listOpenToolroomJobs(db, ids),
		ids.length
			? db
					.selectFrom('service_tasks')
					.select([
						'id',
						'die_id',
						'kind',
						'interval_shots',
						'interval_days',
						'last_done_at',
						'last_done_shots'
					])
					.where('active', '=', 1)
					.where('die_id', 'in', ids)
					.execute()
			: Promise.resolve([]),
		trailingShotsPerDay(
			db,
			dies.map((d) => ({ id: d.id, totalShots: d.total_shots, expectedLifeShots: d.expectedLife })),
			now
		),
		audience === 'plant'
			? listServiceWindows(db, { start, end }, { dieIds: ids })
			: Promise.resolve([])
	]);
	// The one verdict on every run not yet over; customers never see verdict columns (see
	// owner/customer-fields), so theirs is not computed.
	const phases = new Map(bookings.map((b) => [b.id, bookingPhase(b, now)]));
	const judged =
		audience === 'plant'
			? await judgeBookings(
					db,
					// Clashes are found among these, so every die's runs go in, not only those shown.
					bookings.filter((b) => phases.get(b.id) !== 'ended'),
					now
				)
			: new Map<number, Assessment>();

	const totals = new Map(dies.map((d) => [d.id, d.total_shots]));
	const service: BoardServiceRow[] = [];
	for (const t of tasks) {
		const total = totals.get(t.die_id) ?? 0;
		const view = viewServiceTask(t, total, now);
		const due = projectTaskDue(t, view, rates.get(t.die_id) ?? 0, now);
		if (due === null || due >= to) continue;
		// Already due: shown on today (or the first day when the window starts later).
		const day = due < from ? (today >= from && today < to ? today : from) : due;
		if (day < from) continue;
		service.push([index.get(t.die_id)!, day, t.kind, view.state]);
	}

	return {
		from,
		to,
		days: query.days,
		today,
		generatedAt: now,
		press: press
			? { name: press.name, chamber: press.chamber, clampKn: press.clamp_force_kn }
			: null,
		dies: {
			columns: BOARD_DIE_COLUMNS,
			rows: dies.map((d) => [
				d.number,
				d.part_name,
				d.owner,
				d.family,
				d.status,
				// Life follows the steel: the most-worn active half (dies/life.ts).
				Math.round(10 * lifeUsedPctOf(d)) / 10
			])
		},
		bookings: {
			columns: BOARD_BOOKING_COLUMNS,
			rows: bookings
				.filter((b) => index.has(b.die_id))
				.map((b) => [
					b.id,
					index.get(b.die_id)!,
					b.pressName,
					b.starts_at,
					b.ends_at,
					b.order_ref,
					b.parts,
					phases.get(b.id)!,
					judged.get(b.id)?.verdict ?? null,
					judged.get(b.id)?.reasons[0]?.message ?? null
				])
		},
		windows: {
			columns: BOARD_WINDOW_COLUMNS,
			rows: windows
				.filter((w) => index.has(w.dieId))
				.map((w) => [index.get(w.dieId)!, w.id, w.startsAt, w.endsAt, w.kind, w.note, w.jobNumber])
		},
		jobs: {
			columns: BOARD_JOB_COLUMNS,
			rows: jobs
				.filter((j) => audience === 'plant' || customerMaySeeJob(j))
				.map((j) => [index.get(j.dieId)!, j.number, j.kind, j.status, j.openedAt])
		},
		service: { columns: BOARD_SERVICE_COLUMNS, rows: service },
		live: {
			columns: BOARD_LIVE_COLUMNS,
			rows: live
				.filter((l) => l.die_id !== null && index.has(l.die_id))
				.map((l) => [index.get(l.die_id!)!, l.name, l.last_counted_at])
		}
	};
}
