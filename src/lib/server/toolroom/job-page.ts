/** What the job page shows besides its forms: the job, its tasks' states, photos, people, moves. */
import type { RoleName } from '../../roles';
import { MAX_PHOTOS_PER_UPLOAD } from '../../schemas/toolroom';
import type { DB } from '../db/connect';
import { viewServiceTask } from '../dies/service-summary';
import { MAX_PHOTO_BYTES, MAX_PHOTO_PIXELS } from '../photos/process-image';
import { nowIso } from '../time';
import { canLeadToolroom, canWorkToolroom } from './access';
import { listJobEntries } from './job-entries';
import { isActiveJob, JOB_MOVES, jobAgeDays, listAssignees, type JobDetail } from './jobs';
import { listJobPhotos } from './photos';
import { listDieZones, listJobRepairs } from './zones';

/** Upload limits the photo form states (the server enforces them in any case). */
export const PHOTO_LIMITS = {
	maxFiles: MAX_PHOTOS_PER_UPLOAD,
	maxBytes: MAX_PHOTO_BYTES,
	maxMegapixels: MAX_PHOTO_PIXELS / 1e6
};

/** Inspections and cooling checks made under a job, oldest first: the bench record of the job. */
export async function listJobRecords(db: DB, jobId: number) {
	const [inspections, coolingChecks] = await Promise.all([
		db
			.selectFrom('surface_inspections as s')
			.leftJoin('users as u', 'u.id', 's.inspected_by')
			.select([
				's.id',
				's.half',
				's.zone',
				's.grade',
				's.shots_at as shotsAt',
				's.longest_crack_mm as longestCrackMm',
				's.notes',
				's.inspected_at as at',
				'u.name as by'
			])
			.where('s.job_id', '=', jobId)
			.orderBy('s.id')
			.execute(),
		db
			.selectFrom('cooling_checks as k')
			.innerJoin('cooling_circuits as c', 'c.id', 'k.circuit_id')
			.leftJoin('users as u', 'u.id', 'k.checked_by')
			.select([
				'k.id',
				'c.label as circuit',
				'c.half',
				'c.nominal_flow_lpm as nominalFlowLpm',
				'k.measured_flow_lpm as measuredFlowLpm',
				'k.leak_test as leakTest',
				'k.flushed',
				'k.checked_at as at',
				'u.name as by'
			])
			.where('k.job_id', '=', jobId)
			.orderBy('k.id')
			.execute()
	]);
	return { inspections, coolingChecks };
}

export async function getJobPage(db: DB, job: JobDetail, role: RoleName, asOf = nowIso()) {
	const [photos, assignees, records, entries, zones, repairs] = await Promise.all([
		listJobPhotos(db, job.id),
		listAssignees(db),
		listJobRecords(db, job.id),
		listJobEntries(db, job.id),
		listDieZones(db, job.die_id),
		listJobRepairs(db, job.id)
	]);
	return {
		...records,
		entries,
		zones,
		repairs,
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
