import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { crc32, deflateSync } from 'node:zlib';
import { afterAll, afterEach, beforeEach, describe, expect, it } from 'vitest';
import { inspectionSchema } from '../../src/lib/schemas/toolroom';
import { storePhotoFilesWith } from '../../src/lib/server/photos/store';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import { recordInspection } from '../../src/lib/server/toolroom/inspections';
import { addDieZone } from '../../src/lib/server/toolroom/zones';
import { cancelJob } from '../../src/lib/server/toolroom/jobs';
import {
	findViewablePhoto,
	listJobPhotos,
	setPhotoShared,
	uploadPhotos
} from '../../src/lib/server/toolroom/photos';
import {
	asFile,
	makeJpeg,
	makeUploadDir,
	openPlantJob,
	setUpPlant,
	type ToolroomPlant
} from '../fixtures/toolroom';

let plant: ToolroomPlant;
let uploads: Awaited<ReturnType<typeof makeUploadDir>>;
let jobId: number;
let good: Buffer;

beforeEach(async () => {
	plant = await setUpPlant();
	uploads = await makeUploadDir();
	jobId = await openPlantJob(plant);
	good ??= await makeJpeg(160, 120);
});
afterEach(async () => {
	await uploads.remove();
});
afterAll(async () => {
	await closePhotoPool();
});

function upload(files: File[], actor = plant.toolmaker) {
	return uploadPhotos(plant.db, { target: { jobId }, files, actor, photoStore: uploads.store });
}

async function photoRows() {
	return plant.db.selectFrom('photos').selectAll().execute();
}

/** Nothing kept: no photo row, no file, no audit entry of an upload. */
async function expectNothingStored() {
	expect(await photoRows()).toHaveLength(0);
	expect(await uploads.files()).toEqual([]);
	const audit = await plant.db
		.selectFrom('audit_log')
		.select('action')
		.where('action', '=', 'photo.add')
		.execute();
	expect(audit).toHaveLength(0);
}

function pngChunk(type: string, data: Buffer): Buffer {
	const length = Buffer.alloc(4);
	length.writeUInt32BE(data.length);
	const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
	const crc = Buffer.alloc(4);
	crc.writeUInt32BE(crc32(body));
	return Buffer.concat([length, body, crc]);
}

/** A valid-looking PNG of a few dozen bytes whose header claims 30000 × 30000 px. */
function pngBomb(): Buffer {
	const ihdr = Buffer.alloc(13);
	ihdr.writeUInt32BE(30_000, 0);
	ihdr.writeUInt32BE(30_000, 4);
	ihdr[8] = 8;
	ihdr[9] = 2;
	return Buffer.concat([
		Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
		pngChunk('IHDR', ihdr),
		pngChunk('IDAT', deflateSync(Buffer.alloc(64))),
		pngChunk('IEND', Buffer.alloc(0))
	]);
}

describe('uploading photos to a job', () => {
	it('stores a processed full-size JPEG and thumbnail per photo, under random names, with its details', async () => {
		const second = await makeJpeg(90, 200);
		const result = await upload([
			asFile(good, 'gate side.jpg'),
			asFile(second, 'ejector pins.jpg')
		]);
		expect(result).toEqual({ ok: true, count: 2, message: '2 photos added.', problems: [] });

		const rows = await photoRows();
		expect(rows).toHaveLength(2);
		const files = await uploads.files();
		expect(files).toHaveLength(4);
		// Never the uploader's names on disk.
		expect(files.some((f) => /gate|ejector/.test(f))).toBe(false);
		for (const row of rows) {
			expect(row).toMatchObject({
				job_id: jobId,
				inspection_id: null,
				die_id: plant.dieId,
				uploaded_by: plant.toolmaker.userId,
				shared_with_owner: 0,
				source_type: 'jpeg'
			});
			expect(row.public_id).toMatch(/^[A-Za-z0-9_-]{22}$/);
			const full = await readFile(`${uploads.dir}/${row.full_file}`);
			expect(createHash('sha256').update(full).digest('hex')).toBe(row.sha256);
			expect(full.length).toBe(row.bytes);
			// Re-encoded, not the original bytes.
			expect(full.equals(good)).toBe(false);
		}
		expect(rows.map((r) => [r.width, r.height])).toEqual([
			[160, 120],
			[90, 200]
		]);
		expect((await listJobPhotos(plant.db, jobId)).map((p) => p.uploadedBy)).toEqual([
			'toolmaker',
			'toolmaker'
		]);
	});

	describe('refuses each bad file with a clear message and stores nothing', () => {
		it('a text file renamed to .jpg', async () => {
			const text = Buffer.from('Die T-0001 inspection notes: no cracks found.\n');
			const result = await upload([asFile(text, 'notes.jpg')]);
			expect(result).toMatchObject({ ok: false, status: 400 });
			if (result.ok) return;
			expect(result.problems).toEqual([
				{ file: 'notes.jpg', message: expect.stringMatching(/Only JPEG and PNG/) }
			]);
			await expectNothingStored();
		});

		it('a truncated JPEG', async () => {
			const result = await upload([
				asFile(good.subarray(0, Math.floor(good.length / 2)), 'cut.jpg')
			]);
			expect(result).toMatchObject({ ok: false });
			if (result.ok) return;
			expect(result.problems[0]).toMatchObject({
				file: 'cut.jpg',
				message: expect.stringMatching(/incomplete|damaged/)
			});
			await expectNothingStored();
		});

		it('a zero-byte file', async () => {
			const result = await upload([asFile(new Uint8Array(0), 'empty.jpg')]);
			expect(result).toMatchObject({ ok: false });
			if (result.ok) return;
			expect(result.problems).toEqual([{ file: 'empty.jpg', message: 'The file is empty.' }]);
			await expectNothingStored();
		});

		it('a tiny file whose header claims a huge image', async () => {
			const bomb = pngBomb();
			expect(bomb.length).toBeLessThan(200);
			const result = await upload([asFile(bomb, 'bomb.png', 'image/png')]);
			expect(result).toMatchObject({ ok: false });
			if (result.ok) return;
			expect(result.problems[0]).toMatchObject({
				file: 'bomb.png',
				message: expect.stringMatching(/30000 × 30000 px.*at most 40 MP/)
			});
			await expectNothingStored();
		});

		it('too many photos at once', async () => {
			const files = Array.from({ length: 11 }, (_, i) => asFile(good, `p${i}.jpg`));
			const result = await upload(files);
			expect(result).toMatchObject({
				ok: false,
				status: 400,
				message: 'You sent 11 photos; send at most 10 at a time.'
			});
			await expectNothingStored();
		});

		it('no file at all', async () => {
			expect(await upload([])).toMatchObject({ ok: false, message: 'Choose at least one photo.' });
			await expectNothingStored();
		});
	});

	it('two good photos and a bad one: the two are kept, tagged, and the bad one is named', async () => {
		const second = await makeJpeg(90, 200);
		const result = await uploadPhotos(plant.db, {
			target: { jobId },
			files: [
				asFile(good, 'before 1.jpg'),
				asFile(Buffer.from('nope'), 'notes.jpg'),
				asFile(second, 'before 2.jpg')
			],
			actor: plant.toolmaker,
			photoStore: uploads.store,
			stage: 'before'
		});
		expect(result).toEqual({
			ok: true,
			count: 2,
			message: '2 photos added; 1 could not be used: notes.jpg.',
			problems: [
				{
					file: 'notes.jpg',
					message: 'Only JPEG and PNG photos are accepted; this file is not an image.'
				}
			]
		});
		const rows = await photoRows();
		expect(rows.map((r) => [r.width, r.height, r.stage])).toEqual([
			[160, 120, 'before'],
			[90, 200, 'before']
		]);
		expect(await uploads.files()).toHaveLength(4);
	});

	it('only bad photos: nothing is kept and each is named', async () => {
		const result = await upload([
			asFile(Buffer.from('nope'), 'a.jpg'),
			asFile(Buffer.alloc(0), 'b.jpg')
		]);
		expect(result).toMatchObject({
			ok: false,
			status: 400,
			message: 'None of the photos could be saved.'
		});
		if (result.ok) return;
		expect(result.problems.map((p) => p.file)).toEqual(['a.jpg', 'b.jpg']);
		await expectNothingStored();
	});

	it('removes the written files when the database write fails', async () => {
		const image = await import('../../src/lib/server/photos/process-image').then((m) =>
			m.processImage(good)
		);
		await expect(
			storePhotoFilesWith(uploads.store, [image, image], async (files) => {
				expect(await uploads.files()).toHaveLength(4);
				expect(files).toHaveLength(2);
				throw new Error('disk full');
			})
		).rejects.toThrow('disk full');
		expect(await uploads.files()).toEqual([]);
	});

	it('refuses a planner and a cancelled job', async () => {
		expect(await upload([asFile(good, 'a.jpg')], plant.scheduler)).toMatchObject({
			ok: false,
			status: 403
		});
		const job = await plant.db
			.selectFrom('toolroom_jobs')
			.select('number')
			.executeTakeFirstOrThrow();
		await cancelJob(plant.db, { number: job.number, reason: 'Duplicate', actor: plant.lead });
		expect(await upload([asFile(good, 'a.jpg')])).toMatchObject({ ok: false, status: 409 });
		await expectNothingStored();
	});

	it('an inspection with a bad photo is not recorded at all', async () => {
		// The zone is on the die's list, so only the photo can refuse the entry.
		expect(
			await addDieZone(plant.db, plant.dieId, { half: 'cover', name: 'gate' }, plant.lead)
		).toMatchObject({ ok: true });
		const form = inspectionSchema.parse({ half: 'cover', zone: 'gate', shotsAt: 12000, grade: 2 });
		const result = await recordInspection(plant.db, {
			dieId: plant.dieId,
			form,
			files: [asFile(good, 'ok.jpg'), asFile(new Uint8Array(0), 'empty.jpg')],
			actor: plant.toolmaker,
			photoStore: uploads.store
		});
		expect(result).toMatchObject({ ok: false, status: 400 });
		expect(result.ok ? [] : result.problems).not.toHaveLength(0);
		expect(await plant.db.selectFrom('surface_inspections').selectAll().execute()).toHaveLength(0);
		await expectNothingStored();
	});
});

describe('who may see a photo', () => {
	it('plant roles see every photo; an owner only a shared photo of its own die', async () => {
		await upload([asFile(good, 'a.jpg')]);
		const [row] = await photoRows();
		const plantViewer = { role: 'scheduler', customerId: null };
		const owner = { role: 'customer', customerId: plant.customerId };
		const otherOwner = { role: 'customer', customerId: plant.otherCustomerId };

		expect(await findViewablePhoto(plant.db, row.public_id, plantViewer)).toMatchObject({
			fullFile: row.full_file
		});
		expect(await findViewablePhoto(plant.db, row.public_id, owner)).toBeUndefined();

		expect(
			await setPhotoShared(plant.db, {
				publicId: row.public_id,
				shared: true,
				actor: plant.toolmaker
			})
		).toEqual({ ok: true });
		expect(await findViewablePhoto(plant.db, row.public_id, owner)).toBeDefined();
		expect(await findViewablePhoto(plant.db, row.public_id, otherOwner)).toBeUndefined();
		expect(
			await findViewablePhoto(plant.db, 'AAAAAAAAAAAAAAAAAAAAAA', plantViewer)
		).toBeUndefined();

		expect(
			await setPhotoShared(plant.db, {
				publicId: row.public_id,
				shared: true,
				actor: plant.scheduler
			})
		).toMatchObject({ ok: false, status: 403 });
	});
});
