/**
 * Service windows: time the toolroom reserves on a die between press bookings. A window blocks
 * the die's bookings that overlap it (the verdict reads them, see window-clashes.ts) and turns
 * into a toolroom job when it starts: by one click ("start now") or by the scheduled run at its
 * start, which also tells the toolroom through the outbox. Every write is audited.
 */
import type { RoleName } from '../../roles';
import type { OpenJobForm } from '../../schemas/toolroom';
import { DIE_STATUS_LABELS, jobKindLabel } from '../../labels';
import { formatDateTime } from '../../format';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { listNoticeRecipients, writeOutbox } from '../notices/outbox';
import type { NoticeItem } from '../notices/types';
import { canWorkToolroom } from '../toolroom/access';
import { openJob } from '../toolroom/jobs';
import { nowIso } from '../time';
import { findClashes } from './verdict';
import { findWindowClashes } from './window-clashes';

/** Who may reserve and cancel windows: the toolroom lead and the planner (and admin). */
export const WINDOW_EDITORS: RoleName[] = ['admin', 'toolroom_lead', 'scheduler'];

export interface WindowActor {
	userId: string;
	role: RoleName;
}

export type WindowRefusal = {
	ok: false;
	status: 400 | 403 | 404 | 409;
	field?: string;
	message: string;
};

export interface NewWindow {
	die: string;
	/** ISO UTC. */
	startsAt: string;
	endsAt: string;
	kind: string;
	note: string | null;
}

const span = (w: { starts_at: string; ends_at: string }) =>
	`${formatDateTime(w.starts_at)} – ${formatDateTime(w.ends_at)}`;

/**
 * Reserves a window. Refused: an unknown or retired die, a window that has already ended, one
 * overlapping another window of the die, or one over a booked run of the die (move the booking
 * first; the window never silently takes the press time of an order).
 */
export async function reserveServiceWindow(
	db: DB,
	input: NewWindow,
	actor: WindowActor,
	now = nowIso()
): Promise<{ ok: true; id: number } | WindowRefusal> {
	if (!WINDOW_EDITORS.includes(actor.role))
		return { ok: false, status: 403, message: 'Your role may not reserve service windows.' };
	if (!(input.endsAt > input.startsAt))
		return { ok: false, status: 400, field: 'endsAt', message: 'The end must be after the start.' };
	if (input.endsAt <= now)
		return {
			ok: false,
			status: 400,
			field: 'endsAt',
			message: 'This window has already ended; reserve time from now on.'
		};
	return writeTransaction(db, async (trx) => {
		const die = await trx
			.selectFrom('dies')
			.select(['id', 'number', 'status'])
			.where('number', '=', input.die.toUpperCase())
			.executeTakeFirst();
		if (!die)
			return {
				ok: false,
				status: 400,
				field: 'die',
				message: `There is no die ${input.die.toUpperCase()}.`
			} as const;
		if (die.status === 'retired')
			return {
				ok: false,
				status: 409,
				field: 'die',
				message: `${die.number} is retired; a retired die gets no service windows.`
			} as const;
		const [windows, bookings] = await Promise.all([
			findWindowClashes(trx, [die.id], input.startsAt, input.endsAt),
			findClashes(trx, { dieId: die.id }, input.startsAt, input.endsAt)
		]);
		if (windows.length)
			return {
				ok: false,
				status: 409,
				field: 'startsAt',
				message: `${die.number} already has a service window ${span(windows[0])}. Choose another time or change that window.`
			} as const;
		if (bookings.length) {
			const b = bookings[0];
			return {
				ok: false,
				status: 409,
				field: 'startsAt',
				message: `${die.number} is booked on ${b.pressName} ${span(b)} (order ${b.order_ref}). Move that booking first or choose another time.`
			} as const;
		}
		const row = await trx
			.insertInto('service_windows')
			.values({
				die_id: die.id,
				starts_at: input.startsAt,
				ends_at: input.endsAt,
				kind: input.kind,
				note: input.note || null,
				created_by: actor.userId,
				created_at: now
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: 'window.reserve',
				dieId: die.id,
				detail: {
					window: row.id,
					kind: input.kind,
					startsAt: input.startsAt,
					endsAt: input.endsAt,
					note: input.note || null
				}
			},
			now
		);
		return { ok: true, id: row.id } as const;
	});
}

/** Cancels a window (before or after it started; a job already opened stays open). */
export async function cancelServiceWindow(
	db: DB,
	id: number,
	reason: string,
	actor: WindowActor,
	now = nowIso()
): Promise<{ ok: true } | WindowRefusal> {
	if (!WINDOW_EDITORS.includes(actor.role))
		return { ok: false, status: 403, message: 'Your role may not cancel service windows.' };
	return writeTransaction(db, async (trx) => {
		const w = await trx
			.selectFrom('service_windows')
			.selectAll()
			.where('id', '=', id)
			.executeTakeFirst();
		if (!w) return { ok: false, status: 404, message: 'There is no such service window.' } as const;
		if (w.cancelled_at)
			return { ok: false, status: 409, message: 'This window was already cancelled.' } as const;
		if (w.ends_at <= now)
			return { ok: false, status: 409, message: 'This window has already ended.' } as const;
		await trx
			.updateTable('service_windows')
			.set({ cancelled_at: now, cancelled_by: actor.userId, cancel_reason: reason })
			.where('id', '=', id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: 'window.cancel',
				dieId: w.die_id,
				detail: {
					window: id,
					reason,
					before: { cancelled: false },
					after: { cancelled: true }
				}
			},
			now
		);
		return { ok: true } as const;
	});
}

export type StartResult = { ok: true; jobNumber: string; windowId: number } | WindowRefusal;

/**
 * Turns a window into a toolroom job through `openJob` (the one way jobs are opened): the die
 * goes into the toolroom and the job links the die's active service tasks of the window's kind.
 * The window is claimed first by a conditional update, so a click and the scheduled run (or two
 * processes) open one job between them. `automatic` runs act for the toolroom with the
 * reserver recorded as the opener.
 */
export async function startServiceWindow(
	db: DB,
	id: number,
	actor: WindowActor,
	now = nowIso(),
	options: { automatic?: boolean } = {}
): Promise<StartResult> {
	if (!options.automatic && !canWorkToolroom(actor.role))
		return { ok: false, status: 403, message: 'Only the toolroom may start a service window.' };
	const w = await db
		.selectFrom('service_windows')
		.innerJoin('dies', 'dies.id', 'service_windows.die_id')
		.select([
			'service_windows.id',
			'service_windows.die_id',
			'service_windows.starts_at',
			'service_windows.ends_at',
			'service_windows.kind',
			'service_windows.note',
			'service_windows.started_at',
			'service_windows.cancelled_at',
			'dies.number as dieNumber'
		])
		.where('service_windows.id', '=', id)
		.executeTakeFirst();
	if (!w) return { ok: false, status: 404, message: 'There is no such service window.' };
	if (w.cancelled_at) return { ok: false, status: 409, message: 'This window was cancelled.' };
	if (w.started_at) return { ok: false, status: 409, message: 'This window was already started.' };
	if (w.ends_at <= now)
		return { ok: false, status: 409, message: 'This window has already ended.' };

	const claim = await db
		.updateTable('service_windows')
		.set({ started_at: now })
		.where('id', '=', id)
		.where('started_at', 'is', null)
		.where('cancelled_at', 'is', null)
		.executeTakeFirst();
	if (Number(claim.numUpdatedRows) !== 1)
		return { ok: false, status: 409, message: 'This window was already started.' };

	const tasks = await db
		.selectFrom('service_tasks')
		.select('id')
		.where('die_id', '=', w.die_id)
		.where('active', '=', 1)
		.where('kind', '=', w.kind)
		.execute();
	const opened = await openJob(db, {
		dieId: w.die_id,
		actor: options.automatic ? { userId: actor.userId, role: 'toolroom_lead' } : actor,
		at: now,
		form: {
			kind: w.kind as OpenJobForm['kind'],
			half: 'both',
			zone: null,
			description: `Service window ${span(w)}: ${w.note || jobKindLabel(w.kind)}.`,
			assignedTo: '',
			serviceTaskIds: tasks.map((t) => t.id),
			dieToToolroom: true,
			noticeId: undefined
		}
	});
	if (!opened.ok) {
		// The claim stays, with the reason, so the scheduled run does not retry every tick.
		await db
			.updateTable('service_windows')
			.set({ start_problem: opened.message })
			.where('id', '=', id)
			.execute();
		return { ok: false, status: 409, message: opened.message };
	}
	const job = await db
		.selectFrom('toolroom_jobs')
		.select('id')
		.where('number', '=', opened.number)
		.executeTakeFirstOrThrow();
	await db.updateTable('service_windows').set({ job_id: job.id }).where('id', '=', id).execute();
	await writeAudit(
		db,
		{
			userId: actor.userId,
			action: 'window.start',
			dieId: w.die_id,
			detail: { window: id, job: opened.number, automatic: options.automatic === true }
		},
		now
	);
	return { ok: true, jobNumber: opened.number, windowId: id };
}

export interface DueStartReport {
	started: { windowId: number; jobNumber: string; die: string }[];
	problems: { windowId: number; message: string }[];
	/** Delivery rows queued for the toolroom. */
	queued: number;
}

/**
 * The scheduled start: every window whose start has come, not cancelled, not started and not
 * yet over becomes a toolroom job, and the toolroom hears of it through the outbox (one notice
 * per window, under a key of its own, so a second run writes nothing).
 */
export async function startDueServiceWindows(db: DB, now = nowIso()): Promise<DueStartReport> {
	const due = await db
		.selectFrom('service_windows')
		.innerJoin('dies', 'dies.id', 'service_windows.die_id')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select([
			'service_windows.id',
			'service_windows.created_by',
			'service_windows.kind',
			'service_windows.starts_at',
			'service_windows.ends_at',
			'service_windows.note',
			'dies.id as dieId',
			'dies.number as dieNumber',
			'dies.status as dieStatus',
			'dies.part_name',
			'customers.name as customerName'
		])
		.where('service_windows.started_at', 'is', null)
		.where('service_windows.cancelled_at', 'is', null)
		.where('service_windows.starts_at', '<=', now)
		.where('service_windows.ends_at', '>', now)
		.orderBy('service_windows.starts_at')
		.execute();
	const report: DueStartReport = { started: [], problems: [], queued: 0 };
	const items: NoticeItem[] = [];
	for (const w of due) {
		if (!w.created_by) {
			report.problems.push({
				windowId: w.id,
				message: 'Nobody is recorded as reserving this window; start it by hand.'
			});
			continue;
		}
		const result = await startServiceWindow(
			db,
			w.id,
			{ userId: w.created_by, role: 'toolroom_lead' },
			now,
			{ automatic: true }
		);
		if (!result.ok) {
			report.problems.push({ windowId: w.id, message: result.message });
			continue;
		}
		report.started.push({ windowId: w.id, jobNumber: result.jobNumber, die: w.dieNumber });
		items.push({
			key: `window:${w.id}:start`,
			kind: 'die_state',
			level: 'not_bookable',
			dieId: w.dieId,
			subject: `${w.dieNumber} service window started · ${result.jobNumber} opened`,
			payload: {
				kind: 'die_state',
				dieNumber: w.dieNumber,
				partName: w.part_name,
				customerName: w.customerName,
				from: DIE_STATUS_LABELS[w.dieStatus],
				to: DIE_STATUS_LABELS.in_toolroom,
				reason: `Service window ${span(w)} started (${jobKindLabel(w.kind).toLowerCase()}${w.note ? `: ${w.note}` : ''}); toolroom job ${result.jobNumber} opened.`,
				consequence: `The die is reserved for the toolroom until ${formatDateTime(w.ends_at)}; no booking may overlap the window.`
			}
		});
	}
	if (items.length) {
		const written = await writeOutbox(db, items, await listNoticeRecipients(db), now);
		report.queued = written.deliveries;
	}
	return report;
}

export interface ServiceWindowView {
	id: number;
	dieId: number;
	dieNumber: string;
	startsAt: string;
	endsAt: string;
	kind: string;
	note: string | null;
	startedAt: string | null;
	jobNumber: string | null;
	startProblem: string | null;
	createdBy: string | null;
}

/**
 * Windows (not cancelled) overlapping [start, end), optionally of one die, soonest first; what
 * the board and the service-windows page show.
 */
export async function listServiceWindows(
	db: DB,
	range: { start: string; end: string },
	filter: { dieIds?: readonly number[] } = {}
): Promise<ServiceWindowView[]> {
	if (filter.dieIds && filter.dieIds.length === 0) return [];
	const rows = await db
		.selectFrom('service_windows as w')
		.innerJoin('dies', 'dies.id', 'w.die_id')
		.leftJoin('toolroom_jobs as j', 'j.id', 'w.job_id')
		.leftJoin('users as u', 'u.id', 'w.created_by')
		.select([
			'w.id',
			'w.die_id',
			'dies.number as dieNumber',
			'w.starts_at',
			'w.ends_at',
			'w.kind',
			'w.note',
			'w.started_at',
			'j.number as jobNumber',
			'w.start_problem',
			'u.name as createdBy'
		])
		.where('w.cancelled_at', 'is', null)
		.where('w.starts_at', '<', range.end)
		.where('w.ends_at', '>', range.start)
		.$if(filter.dieIds !== undefined, (q) => q.where('w.die_id', 'in', [...filter.dieIds!]))
		.orderBy('w.starts_at')
		.execute();
	return rows.map((r) => ({
		id: r.id,
		dieId: r.die_id,
		dieNumber: r.dieNumber,
		startsAt: r.starts_at,
		endsAt: r.ends_at,
		kind: r.kind,
		note: r.note,
		startedAt: r.started_at,
		jobNumber: r.jobNumber,
		startProblem: r.start_problem,
		createdBy: r.createdBy
	}));
}
