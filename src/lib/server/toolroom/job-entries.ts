/**
 * Hours and parts recorded on a toolroom job while it is open (from the job page, any number of
 * times), not only when it closes. The job's `hours` is the kept sum of its standing work
 * entries, rewritten in the same transaction as every entry that changes it (recorded, voided,
 * or added at close), so the job list, the CSV export, the report and the owner's statement all
 * read one figure. The toolroom lead voids an entry recorded by mistake, with a reason: it stays
 * on the job, struck through, and leaves the sum.
 */
import type { PartUsedForm, WorkEntryForm } from '../../schemas/toolroom';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';
import { canLeadToolroom, canWorkToolroom } from './access';
import { isRefusal, loadActiveJob, type Actor, type Refusal } from './jobs';

export type JobEntryKind = 'work' | 'part';

/**
 * Sum of a job's standing (not voided) work entries, in hours, rounded to 0.01 h so that
 * 0.1 + 0.2 reads 0.3; null when the job has no standing entry.
 */
export async function sumStandingHours(db: DB, jobId: number): Promise<number | null> {
	const row = await db
		.selectFrom('job_work_entries')
		.select((eb) => [
			eb.fn.sum<number | null>('hours').as('total'),
			eb.fn.countAll<number>().as('n')
		])
		.where('job_id', '=', jobId)
		.where('voided_at', 'is', null)
		.executeTakeFirstOrThrow();
	if (!Number(row.n)) return null;
	return Math.round(Number(row.total) * 100) / 100;
}

/** Rewrites the job's kept hours from its entries; returns the new figure. */
export async function keepJobHours(db: DB, jobId: number, at: string): Promise<number | null> {
	const hours = await sumStandingHours(db, jobId);
	await db
		.updateTable('toolroom_jobs')
		.set({ hours, updated_at: at })
		.where('id', '=', jobId)
		.execute();
	return hours;
}

/** Inserts one work entry (no checks; the caller holds the transaction and has checked). */
export async function insertWorkEntry(
	db: DB,
	entry: { jobId: number; hours: number; note: string | null; actor: Actor; at: string }
): Promise<number> {
	const row = await db
		.insertInto('job_work_entries')
		.values({
			job_id: entry.jobId,
			hours: entry.hours,
			note: entry.note,
			recorded_by: entry.actor.userId,
			recorded_at: entry.at
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	return row.id;
}

type Recorded = { ok: true; id: number; jobHours: number | null };

/** Hours worked on an open job (toolmaker or lead). */
export async function recordWorkEntry(
	db: DB,
	input: { number: string; form: WorkEntryForm; actor: Actor; at?: string }
): Promise<Recorded | Refusal> {
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not record work on toolroom jobs.' };
	}
	return writeTransaction(db, async (trx) => {
		const job = await loadActiveJob(trx, input.number);
		if (isRefusal(job)) return job;
		const id = await insertWorkEntry(trx, {
			jobId: job.id,
			hours: input.form.hours,
			note: input.form.note,
			actor: input.actor,
			at
		});
		const jobHours = await keepJobHours(trx, job.id, at);
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'job.work',
				dieId: job.die_id,
				detail: {
					job: job.number,
					entry: id,
					hours: input.form.hours,
					before: { hours: job.hours },
					after: { hours: jobHours }
				}
			},
			at
		);
		return { ok: true, id, jobHours } as const;
	});
}

/** A part used on an open job (toolmaker or lead). */
export async function recordPartUsed(
	db: DB,
	input: { number: string; form: PartUsedForm; actor: Actor; at?: string }
): Promise<{ ok: true; id: number } | Refusal> {
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not record parts on toolroom jobs.' };
	}
	return writeTransaction(db, async (trx) => {
		const job = await loadActiveJob(trx, input.number);
		if (isRefusal(job)) return job;
		const row = await trx
			.insertInto('job_parts_used')
			.values({
				job_id: job.id,
				part: input.form.part,
				quantity: input.form.quantity,
				recorded_by: input.actor.userId,
				recorded_at: at
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await trx
			.updateTable('toolroom_jobs')
			.set({ updated_at: at })
			.where('id', '=', job.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'job.part',
				dieId: job.die_id,
				detail: {
					job: job.number,
					entry: row.id,
					part: input.form.part,
					quantity: input.form.quantity
				}
			},
			at
		);
		return { ok: true, id: row.id } as const;
	});
}

/**
 * Voids a work entry or a part used (toolroom lead, with a reason), also after the job closed:
 * the entry stays on the job, struck through; a work entry leaves the job's hours.
 */
export async function voidJobEntry(
	db: DB,
	input: {
		number: string;
		entry: JobEntryKind;
		id: number;
		reason: string;
		actor: Actor;
		at?: string;
	}
): Promise<{ ok: true; jobHours: number | null } | Refusal> {
	const at = input.at ?? nowIso();
	if (!canLeadToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Only the toolroom lead may void an entry.' };
	}
	const reason = input.reason.trim();
	if (reason.length < 5) {
		return {
			ok: false,
			status: 400,
			field: 'reason',
			message: 'Give the reason (at least 5 characters).'
		};
	}
	const table = input.entry === 'work' ? 'job_work_entries' : 'job_parts_used';
	return writeTransaction(db, async (trx) => {
		const job = await trx
			.selectFrom('toolroom_jobs')
			.select(['id', 'number', 'die_id', 'hours'])
			.where('number', '=', input.number.toUpperCase())
			.executeTakeFirst();
		if (!job) return { ok: false, status: 404, message: 'There is no such job.' } as const;
		const entry = await trx
			.selectFrom(table)
			.select(['id', 'voided_at'])
			.where('id', '=', input.id)
			.where('job_id', '=', job.id)
			.executeTakeFirst();
		if (!entry) {
			return {
				ok: false,
				status: 404,
				field: 'id',
				message: `${job.number} has no such entry.`
			} as const;
		}
		if (entry.voided_at) {
			return {
				ok: false,
				status: 409,
				field: 'id',
				message: 'That entry is already void.'
			} as const;
		}
		await trx
			.updateTable(table)
			.set({ voided_at: at, voided_by: input.actor.userId, void_reason: reason })
			.where('id', '=', entry.id)
			.execute();
		const jobHours = input.entry === 'work' ? await keepJobHours(trx, job.id, at) : job.hours;
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: input.entry === 'work' ? 'job.work.void' : 'job.part.void',
				dieId: job.die_id,
				detail: {
					job: job.number,
					entry: entry.id,
					reason,
					before: { hours: job.hours },
					after: { hours: jobHours }
				}
			},
			at
		);
		return { ok: true, jobHours } as const;
	});
}

/** A job's work entries and parts, oldest first, voided ones included (shown struck through). */
export async function listJobEntries(db: DB, jobId: number) {
	const [work, parts] = await Promise.all([
		db
			.selectFrom('job_work_entries as w')
			.leftJoin('users as u', 'u.id', 'w.recorded_by')
			.select([
				'w.id',
				'w.hours',
				'w.note',
				'w.recorded_at as at',
				'u.name as by',
				'w.voided_at as voidedAt',
				'w.void_reason as voidReason'
			])
			.where('w.job_id', '=', jobId)
			.orderBy('w.id')
			.execute(),
		db
			.selectFrom('job_parts_used as p')
			.leftJoin('users as u', 'u.id', 'p.recorded_by')
			.select([
				'p.id',
				'p.part',
				'p.quantity',
				'p.recorded_at as at',
				'u.name as by',
				'p.voided_at as voidedAt',
				'p.void_reason as voidReason'
			])
			.where('p.job_id', '=', jobId)
			.orderBy('p.id')
			.execute()
	]);
	return { work, parts };
}
export type JobEntries = Awaited<ReturnType<typeof listJobEntries>>;
