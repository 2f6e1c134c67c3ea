/**
 * Surface inspections (heat checking): recording one with its photos, the latest grade and crack
 * trend per zone, the zone timeline and side-by-side comparison, and the dies whose surface is
 * getting worse.
 */
import {
	DEFAULT_REPAIR_GRADE,
	splitCrackSeries,
	type CrackPoint,
	type CrackSeries,
	type CrackTrend
} from '../../calc/crack-trend';
import { MAX_PHOTOS_PER_UPLOAD, type InspectionForm } from '../../schemas/toolroom';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { findTaskToComplete, type TaskOffer } from '../dies/service-plan';
import {
	preparePhotos,
	storePhotoFilesWith,
	type PhotoProblem,
	type UploadedFile
} from '../photos/store';
import type { PhotoStore } from '../photos/photo-store';
import { nowIso } from '../time';
import { canLeadToolroom, canWorkToolroom } from './access';
import { findDieZone, listZoneRepairs } from './zones';
import { isOpenJobOfDie, type Actor } from './jobs';
import { insertPhotoRows, listInspectionPhotos } from './photos';

export type RecordInspectionResult =
	/** `offer`: the plan's surface-inspection task, ready to be marked done in one tap. */
	| { ok: true; id: number; photos: number; offer: TaskOffer | null }
	| {
			ok: false;
			status: 400 | 403 | 404;
			message: string;
			problems: PhotoProblem[];
			field?: 'shotsAt';
	  };

/**
 * An inspection cannot be at more shots than the die has taken: the ledger is the count, so a
 * figure above it is a typing slip (445 800 for 44 580) or shots not yet entered — record them
 * first. Null when the figure is possible.
 */
export function inspectionShotsProblem(shotsAt: number, dieTotal: number): string | null {
	if (shotsAt <= dieTotal) return null;
	const fmt = new Intl.NumberFormat('en-GB').format;
	return `${fmt(shotsAt)} shots is more than this die has taken (${fmt(dieTotal)} on the shot ledger). Enter the die’s count at the inspection, or record the missing shots first.`;
}

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
		photoStore: PhotoStore;
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
		.select(['id', 'status', 'total_shots'])
		.where('id', '=', input.dieId)
		.executeTakeFirst();
	if (!die) return { ok: false, status: 404, message: 'There is no such die.', problems: [] };
	const tooMany = inspectionShotsProblem(form.shotsAt, die.total_shots);
	if (tooMany) {
		return { ok: false, status: 400, message: tooMany, problems: [], field: 'shotsAt' };
	}
	const zone = await findDieZone(db, input.dieId, form.half, form.zone);
	if (!zone) {
		return {
			ok: false,
			status: 400,
			message: `“${form.zone.trim()}” is not on this die’s ${form.half} half zone list. Pick a listed zone; the toolroom lead adds new ones.`,
			problems: []
		};
	}
	// The physical half on the die when the inspection is made (by serial, for the crack series).
	const half = await db
		.selectFrom('die_halves')
		.select('id')
		.where('die_id', '=', input.dieId)
		.where('side', '=', form.half)
		.where('active', '=', 1)
		.orderBy('installed_at', 'desc')
		.executeTakeFirst();
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
	const id = await storePhotoFilesWith(input.photoStore, images, (files) =>
		db.transaction().execute(async (trx) => {
			const row = await trx
				.insertInto('surface_inspections')
				.values({
					die_id: input.dieId,
					job_id: input.jobId ?? null,
					half: form.half,
					zone: zone.name,
					zone_id: zone.id,
					half_id: half?.id ?? null,
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
						inspection: row.id,
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
		.leftJoin('die_halves as h', 'h.id', 's.half_id')
		.select([
			's.id',
			's.half',
			's.zone',
			's.zone_id as zoneId',
			'h.serial as halfSerial',
			's.shots_at as shotsAt',
			's.grade',
			's.longest_crack_mm as longestCrackMm',
			's.soldering',
			's.erosion',
			's.notes',
			's.inspected_at as inspectedAt',
			's.voided_at as voidedAt',
			's.void_reason as voidReason',
			's.corrects_id as correctsId',
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
	zoneId: number | null;
	half: 'cover' | 'ejector';
	zone: string;
	count: number;
	latest: InspectionRow;
	/** Trend of the current series (since the last repair of the zone or the last new half). */
	trend: CrackTrend;
	/** Every series of the zone, oldest first; only the last is current. */
	series: CrackSeries<SeriesPoint>[];
	/** Shots from the die's current total until the trend reaches the repair grade. */
	shotsToRepair: number | null;
	rising: boolean;
}

type SeriesPoint = CrackPoint & { id: number };
type Repair = Awaited<ReturnType<typeof listZoneRepairs>>[number];

/** A zone's key: its list entry, or half and text for rows that predate the list. */
const rowKey = (r: InspectionRow) => (r.zoneId !== null ? `z${r.zoneId}` : zoneKey(r.half, r.zone));

function summariseZones(
	rows: InspectionRow[],
	repairs: Repair[],
	dieTotal: number,
	repairGrade: number
) {
	const groups = new Map<string, InspectionRow[]>();
	for (const r of rows) {
		const key = rowKey(r);
		groups.set(key, [...(groups.get(key) ?? []), r]);
	}
	const zones: ZoneSummary[] = [];
	for (const [key, list] of groups) {
		// Rows come in shot order, later entries last: the last is the latest inspection.
		const latest = list[list.length - 1];
		const series = splitCrackSeries<SeriesPoint>(
			list.map((r) => ({
				id: r.id,
				shots: r.shotsAt,
				grade: r.grade,
				longestCrackMm: r.longestCrackMm,
				at: r.inspectedAt,
				halfSerial: r.halfSerial
			})),
			repairs
				.filter((p) => p.zoneId === latest.zoneId && p.closedAt !== null)
				.map((p) => ({ at: p.closedAt!, kind: p.kind, shots: p.shots })),
			repairGrade
		);
		const trend = series[series.length - 1].trend;
		const rising =
			(trend.slopePerShot !== null && trend.slopePerShot > 0) || latest.grade >= repairGrade;
		zones.push({
			key,
			zoneId: latest.zoneId,
			half: latest.half,
			zone: latest.zone,
			count: list.length,
			latest,
			trend,
			series,
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
	const [allRows, repairs] = await Promise.all([
		inspectionRows(db, die.id),
		listZoneRepairs(db, die.id)
	]);
	// Voided inspections stay on the zone's timeline (struck through) but leave grade and trend.
	const rows = allRows;
	const live = allRows.filter((r) => r.voidedAt === null);
	const zones = summariseZones(live, repairs, die.total_shots, repairGrade);
	const selected = zones.find((z) => z.key === options.zone) ?? zones[0] ?? null;
	const timelineRows = selected ? rows.filter((r) => rowKey(r) === selected.key) : [];
	const photos = await listInspectionPhotos(
		db,
		timelineRows.map((r) => r.id)
	);
	const timeline = timelineRows.map((r) => ({ ...r, photos: photos.get(r.id) ?? [] }));
	return { zones, selected, timeline, repairGrade, inspectionCount: live.length };
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
	const dies = await db
		.selectFrom('dies')
		.select(['id', 'number', 'part_name', 'total_shots'])
		.where('status', '!=', 'retired')
		.where((eb) =>
			eb.exists(
				eb
					.selectFrom('surface_inspections as s')
					.select('s.id')
					.whereRef('s.die_id', '=', 'dies.id')
					.where('s.voided_at', 'is', null)
			)
		)
		.execute();
	const result = [];
	for (const die of dies) {
		// The same zones, series and trends as the die's surface tab (summariseZones).
		const [rows, repairs] = await Promise.all([
			inspectionRows(db, die.id),
			listZoneRepairs(db, die.id)
		]);
		const live = rows.filter((r) => r.voidedAt === null);
		for (const z of summariseZones(live, repairs, die.total_shots, repairGrade)) {
			if (!z.rising) continue;
			result.push({
				dieNumber: die.number,
				partName: die.part_name,
				half: z.half,
				zone: z.zone,
				grade: z.latest.grade,
				shotsAt: z.latest.shotsAt,
				slopePer10k: z.trend.slopePerShot === null ? null : z.trend.slopePerShot * 10_000,
				shotsToRepair: z.shotsToRepair
			});
		}
	}
	return result.sort(
		(a, b) =>
			b.grade - a.grade ||
			(a.shotsToRepair ?? Infinity) - (b.shotsToRepair ?? Infinity) ||
			a.dieNumber.localeCompare(b.dieNumber)
	);
}

export type InspectionChange =
	| { ok: true; id: number }
	| { ok: false; status: 400 | 403 | 404 | 409; field?: string; message: string };

const MIN_REASON = 5;

async function findLiveInspection(db: DB, dieId: number, inspectionId: number) {
	return db
		.selectFrom('surface_inspections')
		.selectAll()
		.where('id', '=', inspectionId)
		.where('die_id', '=', dieId)
		.executeTakeFirst();
}

function refuseChange(actor: Actor, reason: string, what: string): InspectionChange | null {
	if (!canLeadToolroom(actor.role)) {
		return { ok: false, status: 403, message: `Only the toolroom lead may ${what}.` };
	}
	if (reason.trim().length < MIN_REASON) {
		return {
			ok: false,
			status: 400,
			field: 'reason',
			message: `Give the reason (at least ${MIN_REASON} characters).`
		};
	}
	return null;
}

/**
 * Voids an inspection (toolroom lead, with a reason): it stays on the zone's timeline, struck
 * through, and in the audit log, and leaves the zone's latest grade, crack trend and the rising-
 * surface list on the toolroom home.
 */
export async function voidInspection(
	db: DB,
	input: { dieId: number; inspectionId: number; reason: string; actor: Actor; at?: string }
): Promise<InspectionChange> {
	const refused = refuseChange(input.actor, input.reason, 'void an inspection');
	if (refused) return refused;
	const at = input.at ?? nowIso();
	const row = await findLiveInspection(db, input.dieId, input.inspectionId);
	if (!row) return { ok: false, status: 404, message: 'There is no such inspection on this die.' };
	if (row.voided_at) return { ok: false, status: 409, message: 'This inspection is already void.' };
	const reason = input.reason.trim();
	await writeTransaction(db, async (trx) => {
		await trx
			.updateTable('surface_inspections')
			.set({ voided_at: at, voided_by: input.actor.userId, void_reason: reason })
			.where('id', '=', row.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'surface.void',
				dieId: input.dieId,
				detail: {
					inspection: row.id,
					half: row.half,
					zone: row.zone,
					grade: row.grade,
					shots: row.shots_at,
					reason
				}
			},
			at
		);
	});
	return { ok: true, id: row.id };
}

/**
 * Corrects an inspection's figures (toolroom lead, with a reason): a new inspection with the
 * right shots, grade and crack length, at the original time and by the original toolmaker, takes
 * over its photos; the old one is voided. One transaction.
 */
export async function correctInspection(
	db: DB,
	input: {
		dieId: number;
		inspectionId: number;
		values: { shotsAt: number; grade: number; longestCrackMm: number | null };
		reason: string;
		actor: Actor;
		at?: string;
	}
): Promise<InspectionChange> {
	const refused = refuseChange(input.actor, input.reason, 'correct an inspection');
	if (refused) return refused;
	const at = input.at ?? nowIso();
	const old = await findLiveInspection(db, input.dieId, input.inspectionId);
	if (!old) return { ok: false, status: 404, message: 'There is no such inspection on this die.' };
	if (old.voided_at) return { ok: false, status: 409, message: 'This inspection is already void.' };
	const die = await db
		.selectFrom('dies')
		.select('total_shots')
		.where('id', '=', input.dieId)
		.executeTakeFirstOrThrow();
	const tooMany = inspectionShotsProblem(input.values.shotsAt, die.total_shots);
	if (tooMany) return { ok: false, status: 400, field: 'shotsAt', message: tooMany };
	const reason = input.reason.trim();
	const id = await writeTransaction(db, async (trx) => {
		const row = await trx
			.insertInto('surface_inspections')
			.values({
				die_id: old.die_id,
				job_id: old.job_id,
				half: old.half,
				zone: old.zone,
				zone_id: old.zone_id,
				half_id: old.half_id,
				shots_at: input.values.shotsAt,
				grade: input.values.grade,
				longest_crack_mm: input.values.longestCrackMm,
				soldering: old.soldering,
				erosion: old.erosion,
				notes: old.notes,
				inspected_by: old.inspected_by,
				inspected_at: old.inspected_at,
				corrects_id: old.id
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await trx
			.updateTable('photos')
			.set({ inspection_id: row.id })
			.where('inspection_id', '=', old.id)
			.execute();
		await trx
			.updateTable('surface_inspections')
			.set({ voided_at: at, voided_by: input.actor.userId, void_reason: `Corrected: ${reason}` })
			.where('id', '=', old.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'surface.correct',
				dieId: input.dieId,
				detail: {
					inspection: old.id,
					correctedBy: row.id,
					reason,
					was: { shots: old.shots_at, grade: old.grade, crackMm: old.longest_crack_mm },
					now: {
						shots: input.values.shotsAt,
						grade: input.values.grade,
						crackMm: input.values.longestCrackMm
					}
				}
			},
			at
		);
		return row.id;
	});
	return { ok: true, id };
}
