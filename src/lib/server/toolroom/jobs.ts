/**
 * Toolroom jobs: opening (from a die, a service task or a notice), moving through the statuses,
 * closing with findings and the service tasks done, cancelling. Each write is one transaction
 * with its audit entries; the die goes `in_toolroom` while a job holds it and back to `ready` when
 * the last such job ends.
 */
import { randomBytes } from 'node:crypto';
import type { RoleName } from '../../roles';
import type { CloseJobForm, JobActiveStatus, OpenJobForm } from '../../schemas/toolroom';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { DieStatus } from '../db/schema';
import type { JobStatus } from '../db/schema-toolroom';
import { sortWorstFirst, viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';
import { canLeadToolroom, canWorkToolroom } from './access';
import { insertWorkEntry, keepJobHours, sumStandingHours } from './job-entries';

export interface Actor {
	userId: string;
	role: RoleName;
}

export type Refusal = {
	ok: false;
	/** HTTP-like: 400 bad input, 403 not this role, 404 no such thing, 409 state has moved on. */
	status: 400 | 403 | 404 | 409;
	field?: string;
	message: string;
};

const ACTIVE: JobStatus[] = ['open', 'in_progress', 'waiting_parts'];
const DAY_MS = 86_400_000;

/** Moves a job may make between its working statuses (closing and cancelling are separate). */
export const JOB_MOVES: Record<JobActiveStatus, JobActiveStatus[]> = {
	open: ['in_progress', 'waiting_parts'],
	in_progress: ['waiting_parts', 'open'],
	waiting_parts: ['in_progress']
};

export const formatJobNumber = (id: number) => `TJ-${String(id).padStart(5, '0')}`;
export const isActiveJob = (status: JobStatus) => ACTIVE.includes(status);
export const jobAgeDays = (openedAt: string, until: string) =>
	Math.max(0, Math.floor((Date.parse(until) - Date.parse(openedAt)) / DAY_MS));

/** Users a job can be assigned to: active toolmakers and toolroom leads. */
export async function listAssignees(db: DB) {
	return db
		.selectFrom('users')
		.select(['id', 'name', 'role'])
		.where('active', '=', 1)
		.where('role', 'in', ['toolmaker', 'toolroom_lead'])
		.orderBy('name')
		.execute();
}

/** The die's active service tasks with their due state, worst first (to link to a job). */
export async function listDieServiceTasks(
	db: DB,
	die: { id: number; total_shots: number },
	asOf = nowIso()
) {
	const rows = await db
		.selectFrom('service_tasks')
		.selectAll()
		.where('die_id', '=', die.id)
		.where('active', '=', 1)
		.execute();
	return sortWorstFirst(rows.map((t) => viewServiceTask(t, die.total_shots, asOf)));
}

async function checkAssignee(db: DB, userId: string): Promise<Refusal | null> {
	if (!userId) return null;
	const user = await db
		.selectFrom('users')
		.select(['role', 'active'])
		.where('id', '=', userId)
		.executeTakeFirst();
	if (!user || !user.active || !['toolmaker', 'toolroom_lead'].includes(user.role)) {
		return {
			ok: false,
			status: 400,
			field: 'assignedTo',
			message: 'Assign the job to an active toolmaker or toolroom lead.'
		};
	}
	return null;
}

/** Sets the die's state with a 'die.status' audit entry the die page already knows how to show. */
async function setDieStatus(
	trx: DB,
	die: { id: number; status: DieStatus },
	to: DieStatus,
	reason: string,
	actorId: string,
	at: string
) {
	if (die.status === to) return;
	await trx
		.updateTable('dies')
		.set({ status: to, updated_at: at })
		.where('id', '=', die.id)
		.execute();
	await writeAudit(
		trx,
		{
			userId: actorId,
			action: 'die.status',
			dieId: die.id,
			detail: { from: die.status, to, reason }
		},
		at
	);
}

/**
 * After a job ends: a die still `in_toolroom` goes back to `ready` when no other open job holds
 * it. A die someone moved elsewhere meanwhile (held, running) is left as it is.
 */
async function releaseDie(
	trx: DB,
	job: { id: number; die_id: number; number: string; die_to_toolroom: number },
	reason: string,
	actorId: string,
	at: string
): Promise<DieStatus> {
	const die = await trx
		.selectFrom('dies')
		.select(['id', 'status'])
		.where('id', '=', job.die_id)
		.executeTakeFirstOrThrow();
	if (!job.die_to_toolroom || die.status !== 'in_toolroom') return die.status;
	const other = await trx
		.selectFrom('toolroom_jobs')
		.select('id')
		.where('die_id', '=', job.die_id)
		.where('id', '!=', job.id)
		.where('die_to_toolroom', '=', 1)
		.where('status', 'in', ACTIVE)
		.executeTakeFirst();
	if (other) return die.status;
	await setDieStatus(trx, die, 'ready', reason, actorId, at);
	return 'ready';
}

/** Opens a toolroom job on a die; the die goes `in_toolroom` unless the lead says otherwise. */
export async function openJob(
	db: DB,
	input: { dieId: number; form: OpenJobForm; actor: Actor; at?: string }
): Promise<{ ok: true; number: string } | Refusal> {
	const { dieId, form, actor } = input;
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not open toolroom jobs.' };
	}
	if (!form.dieToToolroom && !canLeadToolroom(actor.role)) {
		return {
			ok: false,
			status: 403,
			field: 'dieToToolroom',
			message: 'Only the toolroom lead may keep the die out of the toolroom while a job is open.'
		};
	}
	const assigneeProblem = await checkAssignee(db, form.assignedTo);
	if (assigneeProblem) return assigneeProblem;
	const taskIds = [...new Set(form.serviceTaskIds)];

	return writeTransaction(db, async (trx) => {
		const die = await trx
			.selectFrom('dies')
			.select(['id', 'number', 'status', 'total_shots'])
			.where('id', '=', dieId)
			.executeTakeFirst();
		if (!die) return { ok: false, status: 404, message: 'There is no such die.' } as const;
		if (die.status === 'retired') {
			return {
				ok: false,
				status: 409,
				message: `${die.number} is retired; a retired die takes no toolroom jobs.`
			} as const;
		}
		if (taskIds.length) {
			const tasks = await trx
				.selectFrom('service_tasks')
				.select('id')
				.where('die_id', '=', dieId)
				.where('active', '=', 1)
				.where('id', 'in', taskIds)
				.execute();
			if (tasks.length !== taskIds.length) {
				return {
					ok: false,
					status: 400,
					field: 'serviceTaskIds',
					message: 'Choose service tasks of this die only.'
				} as const;
			}
		}
		const row = await trx
			.insertInto('toolroom_jobs')
			.values({
				// Replaced below by the number made from the row id, inside this transaction.
				number: `pending-${randomBytes(8).toString('hex')}`,
				die_id: dieId,
				kind: form.kind,
				half: form.half,
				zone: form.zone,
				description: form.description,
				assigned_to: form.assignedTo || null,
				source: form.noticeId ? 'notice' : taskIds.length ? 'service_task' : 'die',
				notice_id: form.noticeId ?? null,
				die_to_toolroom: form.dieToToolroom ? 1 : 0,
				die_shots_at_open: die.total_shots,
				opened_by: actor.userId,
				opened_at: at,
				updated_at: at
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		const number = formatJobNumber(row.id);
		await trx.updateTable('toolroom_jobs').set({ number }).where('id', '=', row.id).execute();
		if (taskIds.length) {
			await trx
				.insertInto('job_service_tasks')
				.values(taskIds.map((id) => ({ job_id: row.id, service_task_id: id })))
				.execute();
		}
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: 'job.open',
				dieId,
				detail: { job: number, kind: form.kind, half: form.half, tasks: taskIds.length }
			},
			at
		);
		if (form.dieToToolroom) {
			await setDieStatus(
				trx,
				die,
				'in_toolroom',
				`Toolroom job ${number} opened`,
				actor.userId,
				at
			);
		}
		return { ok: true, number } as const;
	});
}

async function findJobRow(db: DB, number: string) {
	return db
		.selectFrom('toolroom_jobs')
		.selectAll()
		.where('number', '=', number.toUpperCase())
		.executeTakeFirst();
}

/** One job with its die, people and linked service tasks, or undefined. */
export async function getJob(db: DB, number: string) {
	const job = await db
		.selectFrom('toolroom_jobs as j')
		.innerJoin('dies', 'dies.id', 'j.die_id')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.leftJoin('users as assignee', 'assignee.id', 'j.assigned_to')
		.leftJoin('users as opener', 'opener.id', 'j.opened_by')
		.leftJoin('users as closer', 'closer.id', 'j.closed_by')
		.selectAll('j')
		.select([
			'dies.number as dieNumber',
			'dies.part_name as partName',
			'dies.status as dieStatus',
			'dies.total_shots as dieTotalShots',
			'customers.name as customerName',
			'assignee.name as assigneeName',
			'opener.name as openedByName',
			'closer.name as closedByName'
		])
		.where('j.number', '=', number.toUpperCase())
		.executeTakeFirst();
	if (!job) return undefined;
	const tasks = await db
		.selectFrom('job_service_tasks as l')
		.innerJoin('service_tasks as t', 't.id', 'l.service_task_id')
		.select([
			't.id',
			't.kind',
			't.interval_shots as intervalShots',
			't.interval_days as intervalDays',
			't.last_done_at as lastDoneAt',
			't.last_done_shots as lastDoneShots',
			'l.done_at_shots as doneAtShots'
		])
		.where('l.job_id', '=', job.id)
		.orderBy('t.kind')
		.execute();
	return { ...job, tasks };
}
export type JobDetail = NonNullable<Awaited<ReturnType<typeof getJob>>>;

/** Every job of a die, newest first, for the die page's job history. */
export async function listJobsForDie(db: DB, dieId: number) {
	return db
		.selectFrom('toolroom_jobs as j')
		.leftJoin('users as assignee', 'assignee.id', 'j.assigned_to')
		.select([
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
			'j.die_shots_at_open as shotsAtOpen',
			'j.voided_at as voidedAt',
			'j.void_reason as voidReason',
			'assignee.name as assigneeName'
		])
		.where('j.die_id', '=', dieId)
		.orderBy('j.opened_at', 'desc')
		.orderBy('j.id', 'desc')
		.execute();
}

export async function loadActiveJob(trx: DB, number: string): Promise<ActiveJob | Refusal> {
	const job = await findJobRow(trx, number);
	if (!job) return { ok: false, status: 404, message: `There is no job ${number}.` };
	if (!isActiveJob(job.status)) {
		return {
			ok: false,
			status: 409,
			message: `${job.number} is already ${job.status === 'done' ? 'closed' : 'cancelled'}.`
		};
	}
	return job;
}
type ActiveJob = NonNullable<Awaited<ReturnType<typeof findJobRow>>>;
export const isRefusal = (v: ActiveJob | Refusal): v is Refusal => 'ok' in v && v.ok === false;

/** Moves a job between open, in progress and waiting for parts. */
export async function moveJob(
	db: DB,
	input: { number: string; to: JobActiveStatus; actor: Actor; at?: string }
): Promise<{ ok: true } | Refusal> {
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not change toolroom jobs.' };
	}
	return writeTransaction(db, async (trx) => {
		const job = await loadActiveJob(trx, input.number);
		if (isRefusal(job)) return job;
		const from = job.status as JobActiveStatus;
		if (!JOB_MOVES[from].includes(input.to)) {
			return {
				ok: false,
				status: 409,
				message: `${job.number} cannot go from ${from.replace('_', ' ')} to ${input.to.replace('_', ' ')}.`
			} as const;
		}
		await trx
			.updateTable('toolroom_jobs')
			.set({ status: input.to, updated_at: at })
			.where('id', '=', job.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'job.status',
				dieId: job.die_id,
				detail: { job: job.number, from, to: input.to }
			},
			at
		);
		return { ok: true } as const;
	});
}

/** Assigns (or unassigns, with '') an open job. */
export async function assignJob(
	db: DB,
	input: { number: string; assignedTo: string; actor: Actor; at?: string }
): Promise<{ ok: true } | Refusal> {
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not change toolroom jobs.' };
	}
	const problem = await checkAssignee(db, input.assignedTo);
	if (problem) return problem;
	return writeTransaction(db, async (trx) => {
		const job = await loadActiveJob(trx, input.number);
		if (isRefusal(job)) return job;
		await trx
			.updateTable('toolroom_jobs')
			.set({ assigned_to: input.assignedTo || null, updated_at: at })
			.where('id', '=', job.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'job.assign',
				dieId: job.die_id,
				detail: { job: job.number, assignedTo: input.assignedTo || null }
			},
			at
		);
		return { ok: true } as const;
	});
}

/**
 * Closes a job as done: records findings, work, parts and the owner summary, adds the hours typed
 * at close (if any) to those recorded while the job was open, and keeps their sum; marks its
 * service tasks done at the die's current total; returns the die to `ready` when no other open
 * job holds it.
 */
export async function closeJob(
	db: DB,
	input: { number: string; form: CloseJobForm; actor: Actor; at?: string }
): Promise<{ ok: true; dieStatus: DieStatus; tasksDone: number; doneAtShots: number } | Refusal> {
	const { form, actor } = input;
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not close toolroom jobs.' };
	}
	return writeTransaction(db, async (trx) => {
		const job = await loadActiveJob(trx, input.number);
		if (isRefusal(job)) return job;
		// Hours typed at close join those recorded while the job was open; the job's hours are
		// their sum. With none recorded, the close must give them.
		if (form.hours === null && (await sumStandingHours(trx, job.id)) === null) {
			return {
				ok: false,
				status: 400,
				field: 'hours',
				message: 'Enter the hours worked, e.g. 2.5: no hours are recorded on this job yet.'
			} as const;
		}
		if (form.hours !== null) {
			await insertWorkEntry(trx, {
				jobId: job.id,
				hours: form.hours,
				note: 'Recorded when the job was closed',
				actor,
				at
			});
		}
		const hours = await keepJobHours(trx, job.id, at);
		const die = await trx
			.selectFrom('dies')
			.select(['total_shots'])
			.where('id', '=', job.die_id)
			.executeTakeFirstOrThrow();
		await trx
			.updateTable('toolroom_jobs')
			.set({
				status: 'done',
				closed_at: at,
				closed_by: actor.userId,
				die_shots_at_close: die.total_shots,
				findings: form.findings,
				work_done: form.workDone,
				hours,
				parts_used: form.partsUsed,
				billable_to_owner: form.billableToOwner ? 1 : 0,
				owner_summary: form.ownerSummary,
				summary_shared: form.summaryShared ? 1 : 0,
				updated_at: at
			})
			.where('id', '=', job.id)
			.execute();
		const links = await trx
			.selectFrom('job_service_tasks as l')
			.innerJoin('service_tasks as t', 't.id', 'l.service_task_id')
			.select(['t.id', 't.kind'])
			.where('l.job_id', '=', job.id)
			.execute();
		for (const task of links) {
			await trx
				.updateTable('service_tasks')
				.set({ last_done_at: at, last_done_shots: die.total_shots })
				.where('id', '=', task.id)
				.execute();
			await trx
				.updateTable('job_service_tasks')
				.set({ done_at_shots: die.total_shots })
				.where('job_id', '=', job.id)
				.where('service_task_id', '=', task.id)
				.execute();
			await writeAudit(
				trx,
				{
					userId: actor.userId,
					action: 'service.done',
					dieId: job.die_id,
					detail: { job: job.number, task: task.id, kind: task.kind, shots: die.total_shots }
				},
				at
			);
		}
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: 'job.close',
				dieId: job.die_id,
				detail: {
					job: job.number,
					hours,
					billable: form.billableToOwner,
					shots: die.total_shots
				}
			},
			at
		);
		const dieStatus = await releaseDie(
			trx,
			job,
			`Toolroom job ${job.number} closed`,
			actor.userId,
			at
		);
		return {
			ok: true,
			dieStatus,
			tasksDone: links.length,
			doneAtShots: die.total_shots
		} as const;
	});
}

/** Cancels an open job with a reason (toolroom lead or admin); no service task counts as done. */
export async function cancelJob(
	db: DB,
	input: { number: string; reason: string; actor: Actor; at?: string }
): Promise<{ ok: true; dieStatus: DieStatus } | Refusal> {
	const at = input.at ?? nowIso();
	if (!canLeadToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Only the toolroom lead may cancel a job.' };
	}
	return writeTransaction(db, async (trx) => {
		const job = await loadActiveJob(trx, input.number);
		if (isRefusal(job)) return job;
		await trx
			.updateTable('toolroom_jobs')
			.set({
				status: 'cancelled',
				cancel_reason: input.reason,
				closed_at: at,
				closed_by: input.actor.userId,
				updated_at: at
			})
			.where('id', '=', job.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'job.cancel',
				dieId: job.die_id,
				detail: { job: job.number, reason: input.reason }
			},
			at
		);
		const dieStatus = await releaseDie(
			trx,
			job,
			`Toolroom job ${job.number} cancelled: ${input.reason}`,
			input.actor.userId,
			at
		);
		return { ok: true, dieStatus } as const;
	});
}

/**
 * Whether a bench record (inspection, cooling check) may join this job: the job exists, belongs
 * to the die, and is still active. The one rule for every record made from a job.
 */
export async function isOpenJobOfDie(db: DB, jobId: number, dieId: number): Promise<boolean> {
	const job = await db
		.selectFrom('toolroom_jobs')
		.select(['die_id', 'status'])
		.where('id', '=', jobId)
		.executeTakeFirst();
	return !!job && job.die_id === dieId && isActiveJob(job.status);
}
