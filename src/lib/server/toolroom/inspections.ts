/**
 * Surface inspections (heat checking): recording one with its photos, the latest grade and crack
 * trend per zone, the zone timeline and side-by-side comparison, and the dies whose surface is
 * getting worse.
 */
import { crackTrend, DEFAULT_REPAIR_GRADE, type CrackTrend } from '../../calc/crack-trend';
import { MAX_PHOTOS_PER_UPLOAD, type InspectionForm } from '../../schemas/toolroom';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { findTaskToComplete, type TaskOffer } from '../dies/service-plan';
import {
	preparePhotos,
	storePhotoFilesWith,
	type PhotoProblem,
	type UploadedFile
} from '../photos/store';
import { nowIso } from '../time';
import { canWorkToolroom } from './access';
import { isOpenJobOfDie, type Actor } from './jobs';
import { insertPhotoRows, listInspectionPhotos } from './photos';

export type RecordInspectionResult =
	/** `offer`: the plan's surface-inspection task, ready to be marked done in one tap. */
	| { ok: true; id: number; photos: number; offer: TaskOffer | null }
	| { ok: false; status: 400 | 403 | 404; message: string; problems: PhotoProblem[] };

/**
 * Records an inspection and its photos together: the photos are checked first, and a refused
 * photo refuses the whole entry (nothing stored), so the toolmaker fixes it and sends again.
 */
export async function recordInspection(
	db: DB,
	input: {
		dieId: number;
		form: InspectionForm;
		files: UploadedFile[];
		actor: Actor;
		uploadDir: string;
		jobId?: number | null;
		at?: string;
	}
): Promise<RecordInspectionResult> {
	const at = input.at ?? nowIso();
	const { form, actor } = input;
	if (!canWorkToolroom(actor.role)) {
		return {
			ok: false,
			status: 403,
			message: 'Your role may not record inspections.',
			problems: []
		};
	}
	const die = await db
		.selectFrom('dies')
		.select(['id', 'status'])
		.where('id', '=', input.dieId)
		.executeTakeFirst();
	if (!die) return { ok: false, status: 404, message: 'There is no such die.', problems: [] };
	if (input.jobId != null && !(await isOpenJobOfDie(db, input.jobId, input.dieId))) {
		return {
			ok: false,
			status: 400,
			message: 'That job is not an open job of this die; the inspection was not saved.',
			problems: []
		};
	}
	let images: Parameters<typeof storePhotoFilesWith>[1] = [];
	if (input.files.length > 0) {
		const prepared = await preparePhotos(input.files, MAX_PHOTOS_PER_UPLOAD);
		if (!prepared.ok) {
			return {
				ok: false,
				status: 400,
				message: `The inspection was not saved: ${prepared.message}`,
				problems: prepared.problems
			};
		}
		images = prepared.images;
	}
	const id = await storePhotoFilesWith(input.uploadDir, images, (files) =>
		db.transaction().execute(async (trx) => {
			const row = await trx
				.insertInto('surface_inspections')
				.values({
					die_id: input.dieId,
					job_id: input.jobId ?? null,
					half: form.half,
					zone: form.zone,
					shots_at: form.shotsAt,
					grade: form.grade,
					longest_crack_mm: form.longestCrackMm,
					soldering: form.soldering ? 1 : 0,
					erosion: form.erosion ? 1 : 0,
					notes: form.notes,
					inspected_by: actor.userId,
					inspected_at: at
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			await insertPhotoRows(
				trx,
				files,
				{ jobId: null, inspectionId: row.id, dieId: input.dieId },
				actor.userId,
				at
			);
			await writeAudit(
				trx,
				{
					userId: actor.userId,
					action: 'surface.inspect',
					dieId: input.dieId,
					detail: {
						half: form.half,
						zone: form.zone,
						grade: form.grade,
						shots: form.shotsAt,
						photos: files.length
					}
				},
				at
			);
			return row.id;
		})
	);
	const offer = await findTaskToComplete(db, {
		dieId: input.dieId,
		record: 'inspection',
		at,
		shots: form.shotsAt
	});
	return { ok: true, id, photos: images.length, offer };
}

/** Half and zone as one key; zones are free text, so compared trimmed and case-blind. */
export const zoneKey = (half: string, zone: string) => `${half}|${zone.trim().toLowerCase()}`;

async function inspectionRows(db: DB, dieId: number) {
	return db
		.selectFrom('surface_inspections as s')
		.leftJoin('users as u', 'u.id', 's.inspected_by')
		.select([
			's.id',
			's.half',
			's.zone',
			's.shots_at as shotsAt',
			's.grade',
			's.longest_crack_mm as longestCrackMm',
			's.soldering',
			's.erosion',
			's.notes',
			's.inspected_at as inspectedAt',
			'u.name as inspectedBy'
		])
		.where('s.die_id', '=', dieId)
		.orderBy('s.shots_at')
		.orderBy('s.id')
		.execute();
}
type InspectionRow = Awaited<ReturnType<typeof inspectionRows>>[number];

export interface ZoneSummary {
	key: string;
	half: 'cover' | 'ejector';
	zone: string;
	count: number;
	latest: InspectionRow;
	trend: CrackTrend;
	/** Shots from the die's current total until the trend reaches the repair grade. */
	shotsToRepair: number | null;
	rising: boolean;
}

function summariseZones(rows: InspectionRow[], dieTotal: number, repairGrade: number) {
	const groups = new Map<string, InspectionRow[]>();
	for (const r of rows) {
		const key = zoneKey(r.half, r.zone);
		groups.set(key, [...(groups.get(key) ?? []), r]);
	}
	const zones: ZoneSummary[] = [];
	for (const [key, list] of groups) {
		// Rows come in shot order, later entries last: the last is the latest inspection.
		const latest = list[list.length - 1];
		const trend = crackTrend(
			list.map((r) => ({ shots: r.shotsAt, grade: r.grade })),
			repairGrade
		);
		const rising =
			(trend.slopePerShot !== null && trend.slopePerShot > 0) || latest.grade >= repairGrade;
		zones.push({
			key,
			half: latest.half,
			zone: latest.zone,
			count: list.length,
			latest,
			trend,
			shotsToRepair:
				trend.projectedShotsAtRepair === null
					? null
					: Math.max(0, trend.projectedShotsAtRepair - dieTotal),
			rising
		});
	}
	return zones.sort(
		(a, b) =>
			b.latest.grade - a.latest.grade ||
			a.half.localeCompare(b.half) ||
			a.zone.localeCompare(b.zone)
	);
}

/** Everything the surface tab shows: zones with latest grade and trend, one zone's timeline. */
export async function getSurfaceOverview(
	db: DB,
	die: { id: number; total_shots: number },
	options: { zone?: string | null; repairGrade?: number } = {}
) {
	const repairGrade = options.repairGrade ?? DEFAULT_REPAIR_GRADE;
	const rows = await inspectionRows(db, die.id);
	const zones = summariseZones(rows, die.total_shots, repairGrade);
	const selected = zones.find((z) => z.key === options.zone) ?? zones[0] ?? null;
	const timelineRows = selected ? rows.filter((r) => zoneKey(r.half, r.zone) === selected.key) : [];
	const photos = await listInspectionPhotos(
		db,
		timelineRows.map((r) => r.id)
	);
	const timeline = timelineRows.map((r) => ({ ...r, photos: photos.get(r.id) ?? [] }));
	return { zones, selected, timeline, repairGrade, inspectionCount: rows.length };
}

/** Two inspection photos of this die for side-by-side comparison, with grade and shots. */
export async function findComparePhotos(db: DB, dieId: number, ids: string[]) {
	const wanted = ids.filter((id) => /^[A-Za-z0-9_-]{16,40}$/.test(id));
	if (wanted.length === 0) return [];
	const rows = await db
		.selectFrom('photos as p')
		.innerJoin('surface_inspections as s', 's.id', 'p.inspection_id')
		.select([
			'p.public_id as publicId',
			'p.width',
			'p.height',
			's.half',
			's.zone',
			's.grade',
			's.shots_at as shotsAt',
			's.inspected_at as inspectedAt',
			's.longest_crack_mm as longestCrackMm'
		])
		.where('p.die_id', '=', dieId)
		.where('p.public_id', 'in', wanted)
		.execute();
	return wanted.map((id) => rows.find((r) => r.publicId === id)).filter((r) => r !== undefined);
}

/**
 * Zones of active dies whose surface grade is rising (trend slope above 0) or already at or
 * past the repair grade, worst first — for the toolroom home.
 */
export async function listRisingSurfaces(db: DB, repairGrade = DEFAULT_REPAIR_GRADE) {
	const rows = await db
		.selectFrom('surface_inspections as s')
		.innerJoin('dies', 'dies.id', 's.die_id')
		.select([
			's.id',
			's.die_id as dieId',
			'dies.number as dieNumber',
			'dies.part_name as partName',
			'dies.total_shots as dieTotal',
			's.half',
			's.zone',
			's.shots_at as shotsAt',
			's.grade'
		])
		.where('dies.status', '!=', 'retired')
		.orderBy('s.shots_at')
		.orderBy('s.id')
		.execute();
	const byZone = new Map<string, typeof rows>();
	for (const r of rows) {
		const key = `${r.dieId}|${zoneKey(r.half, r.zone)}`;
		byZone.set(key, [...(byZone.get(key) ?? []), r]);
	}
	const result = [];
	for (const list of byZone.values()) {
		const latest = list[list.length - 1];
		const trend = crackTrend(
			list.map((r) => ({ shots: r.shotsAt, grade: r.grade })),
			repairGrade
		);
		const rising = trend.slopePerShot !== null && trend.slopePerShot > 0;
		if (!rising && latest.grade < repairGrade) continue;
		result.push({
			dieNumber: latest.dieNumber,
			partName: latest.partName,
			half: latest.half,
			zone: latest.zone,
			grade: latest.grade,
			shotsAt: latest.shotsAt,
			slopePer10k: trend.slopePerShot === null ? null : trend.slopePerShot * 10_000,
			shotsToRepair:
				trend.projectedShotsAtRepair === null
					? null
					: Math.max(0, trend.projectedShotsAtRepair - latest.dieTotal)
		});
	}
	return result.sort(
		(a, b) =>
			b.grade - a.grade ||
			(a.shotsToRepair ?? Infinity) - (b.shotsToRepair ?? Infinity) ||
			a.dieNumber.localeCompare(b.dieNumber)
	);
}
