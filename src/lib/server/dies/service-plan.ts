// A die's service plan: the tasks with their due state and projected due date, and the writes
// that keep the plan (edit intervals, add, deactivate, mark done), each audited in its transaction.
import { serviceKindLabel } from '../../labels';
import type { AddTaskForm, MarkDoneForm } from '../../schemas/service-plan';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { DieStatus } from '../db/schema';
import { plantDate, plantZone, readPlantDateTime } from '../../plant-time';
import { nowIso } from '../time';
import {
	projectTaskDue,
	sortWorstFirst,
	viewServiceTask,
	type ServiceTaskView
} from './service-summary';

/** What the plan needs to know about the die; `FoundDie` fits. */
export interface PlanDie {
	id: number;
	status: DieStatus;
	total_shots: number;
}

export interface PlanTask extends ServiceTaskView {
	/** Plant date the task reaches 100 % at the die's trailing rate; null if it never will. */
	projectedDue: string | null;
}

export interface InactiveTask {
	id: number;
	kind: string;
	lastDoneAt: string;
}

export type PlanResult =
	| { ok: true; message: string }
	| { ok: false; status: 400 | 404 | 409; field: string | null; message: string };

const notOnPlan: PlanResult = {
	ok: false,
	status: 404,
	field: null,
	message: 'That task is not on this die’s active service plan (it may have been deactivated).'
};
const retiredDie: PlanResult = {
	ok: false,
	status: 409,
	field: null,
	message: 'This die is retired; its service plan is closed.'
};

/** A task's view plus its projected due date at `shotsPerDay`. */
function planTask(
	row: Parameters<typeof viewServiceTask>[0],
	totalShots: number,
	shotsPerDay: number,
	asOf: string
): PlanTask {
	const view = viewServiceTask(row, totalShots, asOf);
	const projectedDue = projectTaskDue(row, view, shotsPerDay, asOf);
	return { ...view, projectedDue };
}

/** The die's active tasks worst first, with projected due dates, and its deactivated ones. */
export async function listServicePlan(
	db: DB,
	die: PlanDie,
	shotsPerDay: number,
	asOf = nowIso()
): Promise<{ tasks: PlanTask[]; inactive: InactiveTask[] }> {
	const rows = await db
		.selectFrom('service_tasks')
		.select([
			'id',
			'kind',
			'interval_shots',
			'interval_days',
			'last_done_at',
			'last_done_shots',
			'active'
		])
		.where('die_id', '=', die.id)
		.orderBy('id')
		.execute();
	const tasks = rows
		.filter((r) => r.active === 1)
		.map((r) => planTask(r, die.total_shots, shotsPerDay, asOf));
	const inactive = rows
		.filter((r) => r.active !== 1)
		.map((r) => ({ id: r.id, kind: r.kind, lastDoneAt: r.last_done_at }));
	return { tasks: sortWorstFirst(tasks), inactive };
}

async function findActiveTask(trx: DB, dieId: number, taskId: number) {
	return trx
		.selectFrom('service_tasks')
		.selectAll()
		.where('id', '=', taskId)
		.where('die_id', '=', dieId)
		.where('active', '=', 1)
		.executeTakeFirst();
}

/** The die as it stands inside the transaction, not as the page saw it. */
async function currentDie(trx: DB, dieId: number) {
	return trx
		.selectFrom('dies')
		.select(['status', 'total_shots'])
		.where('id', '=', dieId)
		.executeTakeFirst();
}

/** Changes one task's intervals (at least one of shots/days; the schema checks the bounds). */
export async function updateTaskIntervals(
	db: DB,
	die: PlanDie,
	input: { taskId: number; intervalShots?: number; intervalDays?: number },
	actorId: string,
	at = nowIso()
): Promise<PlanResult> {
	const intervalShots = input.intervalShots ?? null;
	const intervalDays = input.intervalDays ?? null;
	if (intervalShots === null && intervalDays === null) {
		return {
			ok: false,
			status: 400,
			field: 'intervalShots',
			message: 'Give an interval in shots, in days, or both.'
		};
	}
	return writeTransaction(db, async (trx): Promise<PlanResult> => {
		const [task, now] = await Promise.all([
			findActiveTask(trx, die.id, input.taskId),
			currentDie(trx, die.id)
		]);
		if (!task || !now) return notOnPlan;
		if (now.status === 'retired') return retiredDie;
		await trx
			.updateTable('service_tasks')
			.set({ interval_shots: intervalShots, interval_days: intervalDays })
			.where('id', '=', task.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'service.intervals',
				dieId: die.id,
				detail: {
					taskId: task.id,
					kind: task.kind,
					from: { shots: task.interval_shots, days: task.interval_days },
					to: { shots: intervalShots, days: intervalDays }
				}
			},
			at
		);
		return { ok: true, message: `${serviceKindLabel(task.kind)}: intervals saved.` };
	});
}

/**
 * Adds a task of a kind the die does not have active. Its interval starts now, at the die's
 * current total: a new task has no earlier completion to count from.
 */
export async function addServiceTask(
	db: DB,
	die: PlanDie,
	input: Pick<AddTaskForm, 'kind' | 'intervalShots' | 'intervalDays'>,
	actorId: string,
	at = nowIso()
): Promise<PlanResult> {
	const intervalShots = input.intervalShots ?? null;
	const intervalDays = input.intervalDays ?? null;
	if (intervalShots === null && intervalDays === null) {
		return {
			ok: false,
			status: 400,
			field: 'intervalShots',
			message: 'Give an interval in shots, in days, or both.'
		};
	}
	return writeTransaction(db, async (trx): Promise<PlanResult> => {
		const now = await currentDie(trx, die.id);
		if (!now) return notOnPlan;
		if (now.status === 'retired') return retiredDie;
		const clash = await trx
			.selectFrom('service_tasks')
			.select('id')
			.where('die_id', '=', die.id)
			.where('kind', '=', input.kind)
			.where('active', '=', 1)
			.executeTakeFirst();
		if (clash) {
			return {
				ok: false,
				status: 409,
				field: 'kind',
				message: `This die already has an active ${serviceKindLabel(input.kind).toLowerCase()} task; change its intervals instead.`
			};
		}
		const task = await trx
			.insertInto('service_tasks')
			.values({
				die_id: die.id,
				kind: input.kind,
				interval_shots: intervalShots,
				interval_days: intervalDays,
				last_done_at: at,
				last_done_shots: now.total_shots
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'service.add',
				dieId: die.id,
				detail: {
					taskId: task.id,
					kind: input.kind,
					shots: intervalShots,
					days: intervalDays,
					startShots: now.total_shots
				}
			},
			at
		);
		return { ok: true, message: `${serviceKindLabel(input.kind)} added to the plan.` };
	});
}

/** Takes a task off the plan; the row stays for the record. */
export async function deactivateServiceTask(
	db: DB,
	die: PlanDie,
	taskId: number,
	reason: string,
	actorId: string,
	at = nowIso()
): Promise<PlanResult> {
	return writeTransaction(db, async (trx): Promise<PlanResult> => {
		const task = await findActiveTask(trx, die.id, taskId);
		if (!task) return notOnPlan;
		await trx.updateTable('service_tasks').set({ active: 0 }).where('id', '=', task.id).execute();
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'service.deactivate',
				dieId: die.id,
				detail: { taskId: task.id, kind: task.kind, reason: reason || null }
			},
			at
		);
		return { ok: true, message: `${serviceKindLabel(task.kind)} taken off the plan.` };
	});
}

/**
 * Records that a task was done on `doneOn` (plant date) at `shots` on the die's counter. The date
 * may be earlier than today at the plant, but not in the future nor before the previous
 * completion; the count lies between the count at the previous completion and the die's current
 * total.
 */
export async function markTaskDone(
	db: DB,
	die: PlanDie,
	input: Pick<MarkDoneForm, 'taskId' | 'doneOn' | 'shots'>,
	actorId: string,
	now = nowIso()
): Promise<PlanResult> {
	return writeTransaction(db, async (trx): Promise<PlanResult> => {
		const [task, current] = await Promise.all([
			findActiveTask(trx, die.id, input.taskId),
			currentDie(trx, die.id)
		]);
		if (!task || !current) return notOnPlan;
		if (current.status === 'retired') return retiredDie;

		const zone = plantZone();
		const today = plantDate(now, zone);
		const lastDoneDay = plantDate(task.last_done_at, zone);
		if (input.doneOn > today) {
			return {
				ok: false,
				status: 400,
				field: 'doneOn',
				message: `The date cannot be in the future (today is ${today} at the plant, ${zone}).`
			};
		}
		if (input.doneOn < lastDoneDay) {
			return {
				ok: false,
				status: 400,
				field: 'doneOn',
				message: `This task was last done on ${lastDoneDay}; the new date cannot be earlier.`
			};
		}
		// A correcting entry may have taken the total below the count at the last completion.
		const lowest = Math.min(task.last_done_shots, current.total_shots);
		if (input.shots > current.total_shots) {
			return {
				ok: false,
				status: 400,
				field: 'shots',
				message: `The die has ${current.total_shots.toLocaleString('en-GB')} shots so far; the count cannot be higher.`
			};
		}
		if (input.shots < lowest) {
			return {
				ok: false,
				status: 400,
				field: 'shots',
				message: `The die was at ${lowest.toLocaleString('en-GB')} shots when this task was last done; the count cannot be lower.`
			};
		}

		// Today means now; an earlier day is dated midday plant time, never before the previous
		// completion.
		let doneAt = input.doneOn === today ? now : readPlantDateTime(`${input.doneOn}T12:00`, zone)!;
		if (doneAt < task.last_done_at) doneAt = task.last_done_at;
		await trx
			.updateTable('service_tasks')
			.set({ last_done_at: doneAt, last_done_shots: input.shots })
			.where('id', '=', task.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'service.done',
				dieId: die.id,
				detail: {
					taskId: task.id,
					kind: task.kind,
					doneAt,
					shots: input.shots,
					previous: { at: task.last_done_at, shots: task.last_done_shots }
				}
			},
			now
		);
		return { ok: true, message: `${serviceKindLabel(task.kind)} marked done.` };
	});
}

/** Which plan task a bench record carries out: the one place that pairs them. */
export const TASK_KIND_FOR_RECORD = {
	inspection: 'surface_inspection',
	cooling_flush: 'cooling_flush',
	stress_relief: 'stress_relief'
} as const;
export type RecordKind = keyof typeof TASK_KIND_FOR_RECORD;

/** A one-tap offer to mark a plan task done with the record's date and shots. */
export interface TaskOffer {
	taskId: number;
	kind: string;
	label: string;
	/** UTC date of the record, YYYY-MM-DD. */
	doneOn: string;
	shots: number;
}

/**
 * The die's active plan task that a just-recorded inspection, cooling-line flush or stress
 * relief carries out, offered for completion at the record's date and shot count — or null
 * when the die has no such task, or the task was already recorded done at or after the record.
 * The offer is only a prefilled form: markTaskDone still checks date and shots when it is used.
 */
export async function findTaskToComplete(
	db: DB,
	input: { dieId: number; record: RecordKind; at: string; shots: number }
): Promise<TaskOffer | null> {
	const kind = TASK_KIND_FOR_RECORD[input.record];
	const task = await db
		.selectFrom('service_tasks')
		.select(['id', 'kind', 'last_done_at', 'last_done_shots'])
		.where('die_id', '=', input.dieId)
		.where('kind', '=', kind)
		.where('active', '=', 1)
		.orderBy('id')
		.executeTakeFirst();
	if (!task) return null;
	if (task.last_done_at >= input.at && task.last_done_shots >= input.shots) return null;
	return {
		taskId: task.id,
		kind: task.kind,
		label: serviceKindLabel(task.kind),
		doneOn: input.at.slice(0, 10),
		shots: input.shots
	};
}
