// An inspection cannot be at more shots than the die has taken; the toolroom lead can void or
// correct one, and the zone's grade, trend and the rising-surface list follow.
import { afterAll, afterEach, beforeEach, describe, expect, it } from 'vitest';
import { inspectionSchema } from '../../src/lib/schemas/toolroom';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import {
	correctInspection,
	getSurfaceOverview,
	listRisingSurfaces,
	recordInspection,
	voidInspection
} from '../../src/lib/server/toolroom/inspections';
import {
	asFile,
	makeJpeg,
	makeUploadDir,
	setUpPlant,
	type ToolroomPlant
} from '../fixtures/toolroom';

let plant: ToolroomPlant;
let uploads: Awaited<ReturnType<typeof makeUploadDir>>;

beforeEach(async () => {
	plant = await setUpPlant(); // die T-0001 has 12 000 shots on the ledger
	uploads = await makeUploadDir();
});
afterEach(async () => {
	await uploads.remove();
});
afterAll(async () => {
	await closePhotoPool();
});

const inspect = (shotsAt: string, grade: number, files: File[] = []) =>
	recordInspection(plant.db, {
		dieId: plant.dieId,
		form: inspectionSchema.parse({ half: 'cover', zone: 'Gate side', shotsAt, grade }),
		files,
		actor: plant.toolmaker,
		photoStore: uploads.store
	});

const overview = async () => {
	const die = await plant.db
		.selectFrom('dies')
		.select(['id', 'total_shots'])
		.where('id', '=', plant.dieId)
		.executeTakeFirstOrThrow();
	return getSurfaceOverview(plant.db, die);
};

describe('inspection shots', () => {
	it('more shots than the die has taken is refused, naming both counts', async () => {
		const refused = await inspect('120000', 1);
		expect(refused).toMatchObject({ ok: false, status: 400, field: 'shotsAt' });
		expect(!refused.ok && refused.message).toContain(
			'120,000 shots is more than this die has taken (12,000 on the shot ledger)'
		);
		expect((await overview()).inspectionCount).toBe(0);
		// Exactly the die's count is fine.
		expect((await inspect('12000', 1)).ok).toBe(true);
	});
});

describe('voiding and correcting inspections', () => {
	it('a voided inspection leaves grade, trend and the rising list but stays on the timeline', async () => {
		const first = await inspect('4000', 1);
		const wrong = await inspect('8000', 4);
		if (!first.ok || !wrong.ok) throw new Error('not recorded');
		let view = await overview();
		expect(view.zones[0].latest.grade).toBe(4);
		expect((await listRisingSurfaces(plant.db)).map((z) => z.grade)).toEqual([4]);

		const voided = await voidInspection(plant.db, {
			dieId: plant.dieId,
			inspectionId: wrong.id,
			reason: 'Graded the wrong die',
			actor: plant.lead
		});
		expect(voided).toEqual({ ok: true, id: wrong.id });
		view = await overview();
		expect(view.zones[0].latest.grade).toBe(1);
		expect(view.zones[0].count).toBe(1);
		// One point left: no trend, and grade 1 is below the repair grade, so nothing is rising.
		expect(view.zones[0].trend.slopePerShot).toBeNull();
		expect(await listRisingSurfaces(plant.db)).toEqual([]);
		expect(view.timeline.map((t) => [t.id, t.voidReason])).toEqual([
			[first.id, null],
			[wrong.id, 'Graded the wrong die']
		]);
	});

	it('only the toolroom lead voids, with a reason', async () => {
		const ins = await inspect('4000', 1);
		if (!ins.ok) throw new Error('not recorded');
		const base = { dieId: plant.dieId, inspectionId: ins.id };
		expect(
			await voidInspection(plant.db, { ...base, reason: 'wrong die', actor: plant.toolmaker })
		).toMatchObject({ ok: false, status: 403 });
		expect(
			await voidInspection(plant.db, { ...base, reason: '', actor: plant.lead })
		).toMatchObject({ ok: false, status: 400, field: 'reason' });
	});

	it('a correction replaces the figures, takes the photos along and voids the old one', async () => {
		const photo = await makeJpeg();
		const typo = await inspect('1200', 3, [asFile(photo, 'gate.jpg')]);
		if (!typo.ok) throw new Error('not recorded');
		const tooMany = await correctInspection(plant.db, {
			dieId: plant.dieId,
			inspectionId: typo.id,
			values: { shotsAt: 120_000, grade: 3, longestCrackMm: null },
			reason: 'A zero was missing',
			actor: plant.lead
		});
		expect(tooMany).toMatchObject({ ok: false, field: 'shotsAt' });

		const fixed = await correctInspection(plant.db, {
			dieId: plant.dieId,
			inspectionId: typo.id,
			values: { shotsAt: 12_000, grade: 2, longestCrackMm: 3.5 },
			reason: 'A zero was missing; grade misread',
			actor: plant.lead
		});
		expect(fixed.ok).toBe(true);
		if (!fixed.ok) return;
		const view = await overview();
		expect(view.zones[0].latest).toMatchObject({
			id: fixed.id,
			shotsAt: 12_000,
			grade: 2,
			longestCrackMm: 3.5,
			correctsId: typo.id
		});
		const photos = await plant.db.selectFrom('photos').select('inspection_id').execute();
		expect(photos).toEqual([{ inspection_id: fixed.id }]);
		const old = view.timeline.find((t) => t.id === typo.id);
		expect(old?.voidReason).toBe('Corrected: A zero was missing; grade misread');
		const audit = await plant.db
			.selectFrom('audit_log')
			.select('action')
			.where('action', 'like', 'surface.%')
			.orderBy('id')
			.execute();
		expect(audit.map((a) => a.action)).toEqual(['surface.inspect', 'surface.correct']);
	});
});
