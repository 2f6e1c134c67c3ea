/** What the job page shows besides its forms: the job, its tasks' states, photos, people, moves. */
import type { RoleName } from '../../roles';
import { MAX_PHOTOS_PER_UPLOAD } from '../../schemas/toolroom';
import type { DB } from '../db/connect';
import { viewServiceTask } from '../dies/service-summary';
import { MAX_PHOTO_BYTES, MAX_PHOTO_PIXELS } from '../photos/process-image';
import { nowIso } from '../time';
import { canLeadToolroom, canWorkToolroom } from './access';
import { isActiveJob, JOB_MOVES, jobAgeDays, listAssignees, type JobDetail } from './jobs';
import { listJobPhotos } from './photos';

/** Upload limits the photo form states (the server enforces them in any case). */
export const PHOTO_LIMITS = {
	maxFiles: MAX_PHOTOS_PER_UPLOAD,
	maxBytes: MAX_PHOTO_BYTES,
	maxMegapixels: MAX_PHOTO_PIXELS / 1e6
};

export async function getJobPage(db: DB, job: JobDetail, role: RoleName, asOf = nowIso()) {
	const [photos, assignees] = await Promise.all([listJobPhotos(db, job.id), listAssignees(db)]);
	return {
		job,
		tasks: job.tasks.map((t) => ({
			...viewServiceTask(
				{
					id: t.id,
					kind: t.kind,
					interval_shots: t.intervalShots,
					interval_days: t.intervalDays,
					last_done_at: t.lastDoneAt,
					last_done_shots: t.lastDoneShots
				},
				job.dieTotalShots,
				asOf
			),
			doneAtShots: t.doneAtShots
		})),
		ageDays: jobAgeDays(job.opened_at, job.closed_at ?? asOf),
		photos,
		assignees,
		moves: isActiveJob(job.status) ? JOB_MOVES[job.status as keyof typeof JOB_MOVES] : [],
		canWork: canWorkToolroom(role),
		canLead: canLeadToolroom(role),
		limits: PHOTO_LIMITS
	};
}
