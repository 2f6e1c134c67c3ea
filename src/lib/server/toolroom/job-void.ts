/**
 * Voiding a toolroom job recorded by mistake (toolroom lead, with a reason). The job stays in the
 * die's history and the job list, struck through, and in the audit log; owner pages, statements
 * and the owner's "last service" leave it out.
 *
 * Two cases are refused rather than half-undone: an active job (cancel it first, which also
 * releases the die), and a done job whose close still stands as a service task's "last done"
 * (the plan would keep a service the job did not do — mark the task on the plan first).
 */
import { serviceKindLabel } from '../../labels';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';
import { canLeadToolroom } from './access';
import { isActiveJob, type Actor, type Refusal } from './jobs';

const MIN_REASON = 5;

export async function voidJob(
	db: DB,
	input: { number: string; reason: string; actor: Actor; at?: string }
): Promise<{ ok: true; id: number } | Refusal> {
	if (!canLeadToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Only the toolroom lead may void a job.' };
	}
	const reason = input.reason.trim();
	if (reason.length < MIN_REASON) {
		return {
			ok: false,
			status: 400,
			field: 'reason',
			message: `Give the reason (at least ${MIN_REASON} characters).`
		};
	}
	const at = input.at ?? nowIso();
	return writeTransaction(db, async (trx) => {
		const job = await trx
			.selectFrom('toolroom_jobs')
			.select(['id', 'number', 'die_id', 'status', 'closed_at', 'voided_at'])
			.where('number', '=', input.number.toUpperCase())
			.executeTakeFirst();
		if (!job) return { ok: false, status: 404, message: 'There is no such job.' } as const;
		if (job.voided_at) {
			return { ok: false, status: 409, message: `${job.number} is already void.` } as const;
		}
		if (isActiveJob(job.status)) {
			return {
				ok: false,
				status: 409,
				message: `${job.number} is still open: cancel it first (that releases the die), then void it.`
			} as const;
		}
		const standing = await trx
			.selectFrom('job_service_tasks as l')
			.innerJoin('service_tasks as t', 't.id', 'l.service_task_id')
			.select('t.kind')
			.where('l.job_id', '=', job.id)
			.where('t.last_done_at', '=', job.closed_at)
			.execute();
		if (job.status === 'done' && standing.length > 0) {
			const kinds = standing.map((t) => serviceKindLabel(t.kind).toLowerCase()).join(', ');
			return {
				ok: false,
				status: 409,
				message: `${job.number} is the last ${kinds} on the service plan; mark the task done on the plan at its real date first, then void the job.`
			} as const;
		}
		await trx
			.updateTable('toolroom_jobs')
			.set({ voided_at: at, voided_by: input.actor.userId, void_reason: reason, updated_at: at })
			.where('id', '=', job.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'job.void',
				dieId: job.die_id,
				detail: { job: job.number, status: job.status, reason }
			},
			at
		);
		return { ok: true, id: job.id } as const;
	});
}
