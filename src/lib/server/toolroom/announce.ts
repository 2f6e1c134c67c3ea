import type { DB } from '../db/connect';
import { queueJobCompletedMail } from '../notices/outbox';
import { sendNoticesSoon } from '../notices/cron';

/**
 * Tells the planners, through the outbox, that a closed job's die is ready again. Runs after the
 * closing transaction has committed; a failure here never undoes the close.
 */
export async function announceJobClosed(db: DB, jobNumber: string): Promise<void> {
	const job = await db
		.selectFrom('toolroom_jobs')
		.innerJoin('dies', 'dies.id', 'toolroom_jobs.die_id')
		.select([
			'toolroom_jobs.number',
			'toolroom_jobs.closed_at',
			'toolroom_jobs.work_done',
			'toolroom_jobs.kind',
			'dies.number as dieNumber',
			'dies.status as dieStatus'
		])
		.where('toolroom_jobs.number', '=', jobNumber.toUpperCase())
		.where('toolroom_jobs.status', '=', 'done')
		.executeTakeFirst();
	if (!job?.closed_at || job.dieStatus !== 'ready') return;
	try {
		await queueJobCompletedMail(
			db,
			{
				dieNumber: job.dieNumber,
				jobNumber: job.number,
				summary: job.work_done?.trim() || `Toolroom job (${job.kind.replace(/_/g, ' ')}) completed.`
			},
			job.closed_at
		);
		sendNoticesSoon();
	} catch (err) {
		console.error(`Could not queue the completion mail for ${job.number}`, err);
	}
}
