/**
 * One service history per die, as its owner may read it: service-plan tasks recorded done,
 * finished toolroom jobs the plant shared with the owner or billed to it, and surface
 * inspections (the grade only, unless the inspection was shared). The owner's die page, the
 * statement PDF and the statement CSV all read it from here, so "last service" is the same
 * everywhere. Internal notes, findings, people and parts never leave this module.
 */
import { SURFACE_GRADES } from '../../calc/crack-trend';
import { formatDate } from '../../format';
import { HALF_LABELS, jobKindLabel, serviceKindLabel } from '../../labels';
import type { DB } from '../db/connect';
import { sharedSummary } from './portfolio';

export type ServiceEventKind = 'plan' | 'job' | 'inspection';

export interface ServiceEvent {
	kind: ServiceEventKind;
	/** ISO-8601 UTC instant the work was done (the caller shows it in plant time). */
	at: string;
	/** What was done, in owner words. */
	title: string;
	/** The shared summary or the shared inspection's zone and crack; null otherwise. */
	detail: string | null;
	/** Toolroom job number, for jobs. */
	jobNumber: string | null;
	/** The plant bills this job to the owner. */
	billable: boolean;
	/** Hours booked on a billable job (hours of other jobs are the plant's own). */
	hours: number | null;
	/** Surface grade 0–4, for inspections. */
	grade: number | null;
	/** Die shots when it was done, where recorded. */
	shots: number | null;
}

export interface ServiceHistory {
	/** Newest first. */
	events: ServiceEvent[];
	/** The newest event, whatever its kind: the one "last service" every surface shows. */
	last: ServiceEvent | null;
}

const gradeWords = (grade: number) =>
	SURFACE_GRADES.find((g) => g.grade === grade)?.description ?? `Grade ${grade}`;

function readDetail(text: string): Record<string, unknown> {
	try {
		const value: unknown = JSON.parse(text);
		return value && typeof value === 'object' ? (value as Record<string, unknown>) : {};
	} catch {
		return {};
	}
}

const sameInstant = (a: string, b: string) => Date.parse(a) === Date.parse(b);

/** The service histories of many dies at once, by die id (empty histories included). */
export async function loadServiceHistories(
	db: DB,
	dieIds: readonly number[]
): Promise<Map<number, ServiceHistory>> {
	const result = new Map<number, ServiceHistory>();
	const ids = [...new Set(dieIds)];
	if (ids.length === 0) return result;
	const [audits, tasks, jobs, inspections] = await Promise.all([
		db
			.selectFrom('audit_log')
			.select(['die_id as dieId', 'action', 'at', 'detail'])
			.where('die_id', 'in', ids)
			.where('action', 'in', ['service.done', 'service.add', 'die.create'])
			.orderBy('id')
			.execute(),
		db
			.selectFrom('service_tasks')
			.select(['id', 'die_id as dieId', 'kind', 'last_done_at', 'last_done_shots'])
			.where('die_id', 'in', ids)
			.execute(),
		db
			.selectFrom('toolroom_jobs')
			.select([
				'id',
				'die_id as dieId',
				'number',
				'kind',
				'closed_at',
				'die_shots_at_close',
				'hours',
				'billable_to_owner',
				'owner_summary',
				'summary_shared',
				'voided_at'
			])
			.where('die_id', 'in', ids)
			.where('status', '=', 'done')
			.execute(),
		db
			.selectFrom('surface_inspections as i')
			.leftJoin('toolroom_jobs as j', 'j.id', 'i.job_id')
			.select((eb) => [
				'i.die_id as dieId',
				'i.inspected_at',
				'i.grade',
				'i.half',
				'i.zone',
				'i.longest_crack_mm',
				'i.shots_at',
				'j.summary_shared',
				'j.owner_summary',
				eb
					.selectFrom('photos')
					.select((p) => p.fn.countAll<number>().as('n'))
					.whereRef('photos.inspection_id', '=', 'i.id')
					.where('photos.shared_with_owner', '=', 1)
					.as('sharedPhotos')
			])
			.where('i.die_id', 'in', ids)
			.where('i.voided_at', 'is', null)
			.execute()
	]);
	const events = new Map<number, ServiceEvent[]>(ids.map((id) => [id, []]));
	const voidedJobs = new Set(jobs.filter((j) => j.voided_at !== null).map((j) => j.number));

	// Plan tasks recorded done: each completion in the audit trail, then the plan's own last-done
	// date where the trail has none for it (tasks carried over from an older register or seeded),
	// but not the date a task was put on the plan (that is its start, not a service).
	const starts = new Map<number, string[]>();
	const done = new Map<number, { kind: string; at: string }[]>();
	for (const a of audits) {
		if (a.dieId === null) continue;
		if (a.action !== 'service.done') {
			starts.set(a.dieId, [...(starts.get(a.dieId) ?? []), a.at]);
			continue;
		}
		const d = readDetail(a.detail);
		if (typeof d.job === 'string' && voidedJobs.has(d.job)) continue;
		const kind = typeof d.kind === 'string' ? d.kind : '';
		const at = typeof d.doneAt === 'string' ? d.doneAt : a.at;
		const shots = typeof d.shots === 'number' ? d.shots : null;
		done.set(a.dieId, [...(done.get(a.dieId) ?? []), { kind, at }]);
		events.get(a.dieId)?.push(planEvent(kind, at, shots));
	}
	for (const t of tasks) {
		const recorded = (done.get(t.dieId) ?? []).some(
			(d) => d.kind === t.kind && sameInstant(d.at, t.last_done_at)
		);
		const isStart = (starts.get(t.dieId) ?? []).some((s) => sameInstant(s, t.last_done_at));
		if (recorded || isStart) continue;
		events.get(t.dieId)?.push(planEvent(t.kind, t.last_done_at, t.last_done_shots));
	}

	for (const j of jobs) {
		if (j.voided_at !== null || j.closed_at === null) continue;
		const summary = sharedSummary(j);
		const billable = j.billable_to_owner === 1;
		if (!summary && !billable && j.summary_shared !== 1) continue;
		events.get(j.dieId)?.push({
			kind: 'job',
			at: j.closed_at,
			title: `${jobKindLabel(j.kind)} (toolroom job ${j.number})`,
			detail: summary,
			jobNumber: j.number,
			billable,
			hours: billable ? j.hours : null,
			grade: null,
			shots: j.die_shots_at_close
		});
	}

	for (const i of inspections) {
		const shared = i.summary_shared === 1 || Number(i.sharedPhotos ?? 0) > 0;
		const crack = i.longest_crack_mm === null ? '' : `, longest crack ${i.longest_crack_mm} mm`;
		events.get(i.dieId)?.push({
			kind: 'inspection',
			at: i.inspected_at,
			title: `Surface inspection: grade ${i.grade} (${gradeWords(i.grade)})`,
			detail: shared ? `${HALF_LABELS[i.half]}, ${i.zone}${crack}` : null,
			jobNumber: null,
			billable: false,
			hours: null,
			grade: i.grade,
			shots: i.shots_at
		});
	}

	for (const [id, list] of events) {
		list.sort((a, b) => Date.parse(b.at) - Date.parse(a.at) || a.kind.localeCompare(b.kind));
		result.set(id, { events: list, last: list[0] ?? null });
	}
	return result;
}

function planEvent(kind: string, at: string, shots: number | null): ServiceEvent {
	return {
		kind: 'plan',
		at,
		title: `${serviceKindLabel(kind)} (service plan)`,
		detail: null,
		jobNumber: null,
		billable: false,
		hours: null,
		grade: null,
		shots
	};
}

/** The service history of one die (see loadServiceHistories). */
export async function loadServiceHistory(db: DB, dieId: number): Promise<ServiceHistory> {
	return (await loadServiceHistories(db, [dieId])).get(dieId) ?? { events: [], last: null };
}

/** "Last service" in the words every surface uses: plant date and what was done. */
export function lastServiceText(last: ServiceEvent | null): string {
	return last ? `${formatDate(last.at)} · ${last.title}` : 'None recorded';
}
