import { recordShots } from '../../src/lib/server/shots/ledger';
import { afterAll, afterEach, beforeEach, describe, expect, it } from 'vitest';
import { crackTrend } from '../../src/lib/calc/crack-trend';
import { inspectionSchema } from '../../src/lib/schemas/toolroom';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import {
	findComparePhotos,
	getSurfaceOverview,
	listRisingSurfaces,
	recordInspection
} from '../../src/lib/server/toolroom/inspections';
import {
	asFile,
	makeJpeg,
	makeUploadDir,
	setUpPlant,
	type ToolroomPlant
} from '../fixtures/toolroom';
import { addDieZone, findDieZone, recordJobRepairs } from '../../src/lib/server/toolroom/zones';

let plant: ToolroomPlant;
let uploads: Awaited<ReturnType<typeof makeUploadDir>>;

beforeEach(async () => {
	plant = await setUpPlant();
	uploads = await makeUploadDir();
});
afterEach(async () => {
	await uploads.remove();
});
afterAll(async () => {
	await closePhotoPool();
});

async function inspect(
	values: {
		half?: 'cover' | 'ejector';
		zone: string;
		shotsAt: number;
		grade: number;
		crack?: number;
		at?: string;
	},
	files: File[] = [],
	dieId = plant.dieId
) {
	// The toolroom lead keeps the die's zone list; the inspection picks from it.
	if (!(await findDieZone(plant.db, dieId, values.half ?? 'cover', values.zone))) {
		const added = await addDieZone(
			plant.db,
			dieId,
			{ half: values.half ?? 'cover', name: values.zone },
			plant.lead
		);
		if (!added.ok) throw new Error(added.message);
	}
	const form = inspectionSchema.parse({
		half: values.half ?? 'cover',
		zone: values.zone,
		shotsAt: values.shotsAt,
		grade: values.grade,
		longestCrackMm: values.crack ?? ''
	});
	const result = await recordInspection(plant.db, {
		dieId,
		form,
		files,
		actor: plant.toolmaker,
		photoStore: uploads.store,
		at: values.at
	});
	if (!result.ok) throw new Error(result.message);
	return result;
}

describe('surface inspections', () => {
	it('records grade, zone, shots and photos, and shows the latest grade per zone', async () => {
		const photo = await makeJpeg();
		const result = await inspect({ zone: 'Gate side', shotsAt: 4000, grade: 1 }, [
			asFile(photo, 'a.jpg')
		]);
		expect(result).toMatchObject({ ok: true, photos: 1 });
		await inspect({ zone: 'gate side ', shotsAt: 8000, grade: 2, crack: 4.5 });
		await inspect({ half: 'ejector', zone: 'Core 1', shotsAt: 8000, grade: 0 });

		const overview = await getSurfaceOverview(plant.db, { id: plant.dieId, total_shots: 12_000 });
		// Zones compare trimmed and case-blind, so both gate-side entries are one zone.
		expect(overview.zones.map((z) => [z.half, z.count, z.latest.grade, z.latest.shotsAt])).toEqual([
			['cover', 2, 2, 8000],
			['ejector', 1, 0, 8000]
		]);
		expect(overview.zones[0].latest.longestCrackMm).toBe(4.5);
		// Two shot counts are too few for a trend.
		expect(overview.zones[0].trend.slopePerShot).toBeNull();
		expect(overview.timeline.map((t) => [t.shotsAt, t.photos.length])).toEqual([
			[4000, 1],
			[8000, 0]
		]);
		const audit = await plant.db
			.selectFrom('audit_log')
			.select('action')
			.where('action', '=', 'surface.inspect')
			.execute();
		expect(audit).toHaveLength(3);
	});

	it('projects the shots to the repair grade from the least-squares trend of the zone', async () => {
		// Grade 1 at 2 000, 1 at 6 000, 2 at 10 000: slope 1/8000 per shot.
		await inspect({ zone: 'gate', shotsAt: 2000, grade: 1 });
		await inspect({ zone: 'gate', shotsAt: 6000, grade: 1 });
		await inspect({ zone: 'gate', shotsAt: 10_000, grade: 2 });
		const expected = crackTrend([
			{ shots: 2000, grade: 1 },
			{ shots: 6000, grade: 1 },
			{ shots: 10_000, grade: 2 }
		]);
		const overview = await getSurfaceOverview(plant.db, { id: plant.dieId, total_shots: 12_000 });
		const zone = overview.zones[0];
		expect(zone.trend).toEqual(expected);
		expect(zone.trend.slopePerShot).toBeCloseTo(1 / 8000, 12);
		// Hand check: mean shots 6000, mean grade 4/3, so grade = 7/12 + shots/8000; grade 3 at
		// 19 333.3 shots, rounded up to 19 334 — 7 334 shots after the die's 12 000.
		expect(zone.trend.projectedShotsAtRepair).toBe(19_334);
		expect(zone.shotsToRepair).toBe(7334);
		expect(zone.rising).toBe(true);

		const rising = await listRisingSurfaces(plant.db);
		expect(rising).toEqual([
			expect.objectContaining({ dieNumber: 'T-0001', zone: 'gate', grade: 2, shotsToRepair: 7334 })
		]);
	});

	it('lists a zone at the repair grade even without a trend, and leaves flat zones and retired dies out', async () => {
		await inspect({ zone: 'runner', shotsAt: 1000, grade: 3 });
		await inspect({ zone: 'flat', shotsAt: 1000, grade: 1 });
		await inspect({ zone: 'flat', shotsAt: 5000, grade: 1 });
		await inspect({ zone: 'flat', shotsAt: 9000, grade: 1 });
		await inspect({ zone: 'gate', shotsAt: 100, grade: 1 }, [], plant.otherDieId);
		await inspect({ zone: 'gate', shotsAt: 200, grade: 2 }, [], plant.otherDieId);
		await inspect({ zone: 'gate', shotsAt: 300, grade: 3 }, [], plant.otherDieId);
		await plant.db
			.updateTable('dies')
			.set({ status: 'retired' })
			.where('id', '=', plant.otherDieId)
			.execute();

		const rising = await listRisingSurfaces(plant.db);
		expect(rising.map((r) => [r.dieNumber, r.zone, r.grade])).toEqual([['T-0001', 'runner', 3]]);
	});

	it('finds two photos of this die for side-by-side comparison, and none of another die', async () => {
		const photo = await makeJpeg();
		await inspect({ zone: 'gate', shotsAt: 2000, grade: 1 }, [asFile(photo, 'a.jpg')]);
		await inspect({ zone: 'gate', shotsAt: 9000, grade: 3 }, [asFile(photo, 'b.jpg')]);
		await inspect(
			{ zone: 'gate', shotsAt: 100, grade: 0 },
			[asFile(photo, 'c.jpg')],
			plant.otherDieId
		);
		const rows = await plant.db
			.selectFrom('photos')
			.innerJoin('surface_inspections', 'surface_inspections.id', 'photos.inspection_id')
			.select(['photos.public_id', 'surface_inspections.shots_at'])
			.orderBy('photos.id')
			.execute();
		const [a, b, other] = rows.map((r) => r.public_id);

		const pair = await findComparePhotos(plant.db, plant.dieId, [b, a]);
		expect(pair.map((p) => [p.grade, p.shotsAt])).toEqual([
			[3, 9000],
			[1, 2000]
		]);
		expect(await findComparePhotos(plant.db, plant.dieId, [other, 'not an id'])).toEqual([]);
	});
});

describe('zones from the die’s list, and series since the last repair', () => {
	it('refuses a zone that is not on the die’s list, and lets only the lead add one', async () => {
		const form = inspectionSchema.parse({
			half: 'cover',
			zone: 'slide 3',
			shotsAt: 100,
			grade: 1,
			longestCrackMm: ''
		});
		const refused = await recordInspection(plant.db, {
			dieId: plant.dieId,
			form,
			files: [],
			actor: plant.toolmaker,
			photoStore: uploads.store
		});
		expect(refused).toMatchObject({ ok: false, status: 400 });
		expect(await plant.db.selectFrom('surface_inspections').select('id').execute()).toHaveLength(0);
		expect(
			await addDieZone(plant.db, plant.dieId, { half: 'cover', name: 'slide 3' }, plant.toolmaker)
		).toMatchObject({ ok: false, status: 403 });
	});

	it('restarts a zone’s series after a weld repair recorded on a closed job', async () => {
		await inspect({ zone: 'gate', shotsAt: 2000, grade: 1, at: '2026-01-10T08:00:00.000Z' });
		await inspect({ zone: 'gate', shotsAt: 6000, grade: 2, at: '2026-02-10T08:00:00.000Z' });
		await inspect({ zone: 'gate', shotsAt: 10_000, grade: 3, at: '2026-03-10T08:00:00.000Z' });
		const gate = (await findDieZone(plant.db, plant.dieId, 'cover', 'gate'))!;
		const job = await plant.db
			.insertInto('toolroom_jobs')
			.values({
				number: 'TJ-00090',
				die_id: plant.dieId,
				kind: 'repair',
				half: 'cover',
				zone: 'gate',
				description: 'Weld the gate heat checks',
				source: 'die',
				status: 'done',
				die_shots_at_open: 10_000,
				die_shots_at_close: 10_000,
				opened_at: '2026-03-12T08:00:00.000Z',
				updated_at: '2026-03-20T16:00:00.000Z',
				closed_at: '2026-03-20T16:00:00.000Z'
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		expect(
			await recordJobRepairs(plant.db, job.id, [{ zoneId: gate.id, kind: 'weld' }], plant.lead)
		).toEqual({ ok: true });
		await inspect({ zone: 'gate', shotsAt: 12_000, grade: 0, at: '2026-04-10T08:00:00.000Z' });
		// The die runs on: 12 000 + 4 000 = 16 000 shots before the next inspection (an inspection
		// cannot be at more shots than the die has taken).
		const more = await recordShots(
			plant.db,
			[{ die: 'T-0001', shots: 4_000, countedAt: '2026-05-01T22:00:00.000Z' }],
			{ userId: plant.lead.userId, tokenId: null, customerId: null },
			{ source: 'manual', now: '2026-05-02T08:00:00.000Z' }
		);
		if (!more.ok) throw new Error(JSON.stringify(more.issues));
		await inspect({ zone: 'gate', shotsAt: 16_000, grade: 0, at: '2026-05-10T08:00:00.000Z' });
		const overview = await getSurfaceOverview(plant.db, { id: plant.dieId, total_shots: 16_000 });
		const zone = overview.zones.find((z) => z.zone === 'gate')!;
		expect(
			zone.series.map((s) => [s.startedBy.kind, s.current, s.points.map((p) => p.shots)])
		).toEqual([
			['first', false, [2000, 6000, 10_000]],
			['repair', true, [12_000, 16_000]]
		]);
		// The earlier series rose 1 grade per 4 000 shots (hand: points on grade = 0.5 + x/4000);
		// the welded zone shows no rise yet, so the projection no longer says "repair now".
		expect(zone.series[0].trend.slopePerShot).toBeCloseTo(1 / 4000, 12);
		expect(zone.trend).toEqual({
			slopePerShot: null,
			intercept: null,
			projectedShotsAtRepair: null
		});
		expect(zone.rising).toBe(false);
	});
});

describe('an inspection completes the plan’s surface-inspection task', () => {
	it('offers the task with the inspection’s date and shots, and the offer marks it done', async () => {
		const { findTaskToComplete, markTaskDone } =
			await import('../../src/lib/server/dies/service-plan');
		const task = await plant.db
			.selectFrom('service_tasks')
			.select(['id', 'last_done_shots'])
			.where('die_id', '=', plant.dieId)
			.where('kind', '=', 'surface_inspection')
			.where('active', '=', 1)
			.executeTakeFirst();
		// The A380 template gives every new die a surface-inspection task (created at 0 shots).
		expect(task).toBeDefined();
		expect(task!.last_done_shots).toBe(0);

		const form = inspectionSchema.parse({
			half: 'cover',
			zone: 'Gate side',
			shotsAt: 11_500,
			grade: 2,
			longestCrackMm: ''
		});
		const result = await recordInspection(plant.db, {
			dieId: plant.dieId,
			form,
			files: [],
			actor: plant.toolmaker,
			photoStore: uploads.store,
			at: '2026-02-03T09:30:00.000Z'
		});
		if (!result.ok) throw new Error(result.message);
		expect(result.offer).toEqual({
			taskId: task!.id,
			kind: 'surface_inspection',
			label: 'Surface inspection',
			doneOn: '2026-02-03',
			shots: 11_500
		});

		// The one tap: the plan's own done action with the offered values.
		const done = await markTaskDone(
			plant.db,
			{ id: plant.dieId, status: 'ready', total_shots: 12_000 },
			{ taskId: result.offer!.taskId, doneOn: result.offer!.doneOn, shots: result.offer!.shots },
			plant.toolmaker.userId,
			'2026-02-03T10:00:00.000Z'
		);
		expect(done.ok).toBe(true);
		const after = await plant.db
			.selectFrom('service_tasks')
			.select(['last_done_at', 'last_done_shots'])
			.where('id', '=', task!.id)
			.executeTakeFirstOrThrow();
		// Same day as "now" in markTaskDone's terms → stamped with that moment.
		expect(after).toEqual({ last_done_at: '2026-02-03T10:00:00.000Z', last_done_shots: 11_500 });

		// Once done at those shots, the same inspection offers nothing more.
		expect(
			await findTaskToComplete(plant.db, {
				dieId: plant.dieId,
				record: 'inspection',
				at: '2026-02-03T09:30:00.000Z',
				shots: 11_500
			})
		).toBeNull();
	});

	it('joins an open job of the die, and refuses a job of another die', async () => {
		const { openPlantJob } = await import('../fixtures/toolroom');
		const otherJobId = await openPlantJob(plant, { dieId: plant.otherDieId, actor: plant.lead });
		const form = inspectionSchema.parse({ half: 'cover', zone: 'Core', shotsAt: 100, grade: 1 });
		const refused = await recordInspection(plant.db, {
			dieId: plant.dieId,
			form,
			files: [],
			actor: plant.toolmaker,
			photoStore: uploads.store,
			jobId: otherJobId
		});
		expect(refused).toMatchObject({ ok: false, status: 400 });
		expect(await plant.db.selectFrom('surface_inspections').select('id').execute()).toHaveLength(0);
	});
});
