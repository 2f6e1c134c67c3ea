// PHOTO_STORE=s3 against a fake S3 (s3rver, in this process, in a temp folder): photos uploaded
// through the handler the routes use land in the bucket, come back through the photo route's own
// GET with today's access rule, and a failed save leaves no object behind.
import { createHash } from 'node:crypto';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { DeleteObjectCommand, ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import type { RequestEvent } from '@sveltejs/kit';
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { startFakeS3, type FakeS3 } from '../../fakes/s3/server';
import type { RoleName } from '../../src/lib/roles';
import { inspectImage, processImage } from '../../src/lib/server/photos/process-image';
import {
	photoStoreFromEnv,
	s3ConfigOf,
	type PhotoStore
} from '../../src/lib/server/photos/photo-store';
import { storePhotoFilesWith, writePhotoFiles } from '../../src/lib/server/photos/store';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import {
	insertPhotoRows,
	setPhotoShared,
	uploadPhotos
} from '../../src/lib/server/toolroom/photos';
import {
	asFile,
	makeJpeg,
	openPlantJob,
	setUpPlant,
	type ToolroomPlant
} from '../fixtures/toolroom';

const current = vi.hoisted(() => ({}) as { db: unknown; store: unknown });
vi.mock('$lib/server/db', () => ({ getDb: () => current.db }));
vi.mock('$lib/server/photos', () => ({ getPhotoStore: () => current.store }));

const { GET } = await import('../../src/routes/photos/[id]/[variant]/+server');
const { savePlantLogoAction } = await import('../../src/routes/settings/plant-identity');
const { GET: getPlantLogo } = await import('../../src/routes/plant-logo/+server');

let folder: string;
let fake: FakeS3;
let store: PhotoStore;
let s3: S3Client;
let plant: ToolroomPlant;
let jobId: number;
let photo: Buffer;

beforeAll(async () => {
	folder = await mkdtemp(path.join(tmpdir(), 'castellan-fake-s3-'));
	fake = await startFakeS3({ port: 0, directory: folder, bucket: 'plant-photos' });
	// The store is built from the variables, as the app builds it.
	store = photoStoreFromEnv(fake.env);
	current.store = store;
	s3 = new S3Client({
		region: 'us-east-1',
		endpoint: fake.endpoint,
		forcePathStyle: true,
		credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' }
	});
	// 800 × 600: kept at full size (long side ≤ 2560), thumbnail 400 × 300 (long side 400).
	photo = await makeJpeg(800, 600);
});

beforeEach(async () => {
	for (const key of await bucketKeys()) {
		await s3.send(new DeleteObjectCommand({ Bucket: fake.bucket, Key: key }));
	}
	plant = await setUpPlant();
	current.db = plant.db;
	jobId = await openPlantJob(plant);
});

afterAll(async () => {
	s3?.destroy();
	await fake?.close();
	await rm(folder, { recursive: true, force: true });
	await closePhotoPool();
});

async function bucketKeys(): Promise<string[]> {
	const listed = await s3.send(new ListObjectsV2Command({ Bucket: fake.bucket }));
	return (listed.Contents ?? []).map((o) => o.Key!).sort();
}

/** The photo route's GET, as SvelteKit calls it, for a signed-in user. */
async function getPhoto(
	publicId: string,
	variant: string,
	user: { role: RoleName; customerId: number | null }
): Promise<{ status: number; bytes: Buffer | null }> {
	const url = new URL(`http://plant.test/photos/${publicId}/${variant}`);
	const event = {
		url,
		request: new Request(url),
		params: { id: publicId, variant },
		locals: {
			user: { id: 'u', name: 'Test', email: 't@plant.test', unitSystem: 'metric', ...user },
			session: null
		}
	} as unknown as Parameters<typeof GET>[0] & RequestEvent;
	try {
		const res = await GET(event);
		return { status: res.status, bytes: Buffer.from(await res.arrayBuffer()) };
	} catch (thrown) {
		const status = (thrown as { status?: number }).status;
		if (typeof status !== 'number') throw thrown;
		return { status, bytes: null };
	}
}

describe('photos in an S3 bucket', () => {
	it('an upload lands in the bucket and comes back through the photo route for whoever may see it', async () => {
		const result = await uploadPhotos(plant.db, {
			target: { jobId },
			files: [asFile(photo, 'gate.jpg')],
			actor: plant.toolmaker,
			photoStore: store
		});
		expect(result).toMatchObject({ ok: true, count: 1 });
		const row = await plant.db
			.selectFrom('photos')
			.select(['public_id', 'full_file', 'thumb_file', 'sha256'])
			.executeTakeFirstOrThrow();
		// Exactly the row's two objects, under the same names a folder would use.
		expect(await bucketKeys()).toEqual([row.full_file, row.thumb_file].sort());
		expect(row.full_file).toMatch(/^photos\/[0-9a-f]{2}\/[0-9a-f]{32}\.jpg$/);
		// The thumbnail is named after the full size, as writePhotoFiles names the pair.
		expect(row.thumb_file).toBe(row.full_file.replace(/\.jpg$/, '.thumb.jpg'));

		const plantRole = { role: 'toolmaker' as const, customerId: null };
		const full = await getPhoto(row.public_id, 'full', plantRole);
		expect(full.status).toBe(200);
		expect(createHash('sha256').update(full.bytes!).digest('hex')).toBe(row.sha256);
		expect(inspectImage(full.bytes!)).toMatchObject({ type: 'jpeg', width: 800, height: 600 });
		const thumb = await getPhoto(row.public_id, 'thumb', plantRole);
		expect(thumb.status).toBe(200);
		expect(inspectImage(thumb.bytes!)).toMatchObject({ type: 'jpeg', width: 400, height: 300 });

		const owner = { role: 'customer' as const, customerId: plant.customerId };
		const otherOwner = { role: 'customer' as const, customerId: plant.otherCustomerId };
		// Not shared yet: the die's own owner gets the same 404 as anyone else.
		expect((await getPhoto(row.public_id, 'full', owner)).status).toBe(404);
		const shared = await setPhotoShared(plant.db, {
			publicId: row.public_id,
			shared: true,
			actor: plant.lead
		});
		expect(shared).toEqual({ ok: true });
		const ownerFull = await getPhoto(row.public_id, 'full', owner);
		expect(ownerFull.status).toBe(200);
		expect(ownerFull.bytes!.equals(full.bytes!)).toBe(true);
		// Another customer: 404, exactly as for a photo that does not exist.
		expect(await getPhoto(row.public_id, 'full', otherOwner)).toEqual({
			status: 404,
			bytes: null
		});
		expect(await getPhoto(row.public_id, 'thumb', otherOwner)).toEqual({
			status: 404,
			bytes: null
		});
		expect((await getPhoto('no-such-photo', 'full', plantRole)).status).toBe(404);
	});

	it('a photo whose object is gone from the bucket is a 404, not a server error', async () => {
		await uploadPhotos(plant.db, {
			target: { jobId },
			files: [asFile(photo, 'gate.jpg')],
			actor: plant.toolmaker,
			photoStore: store
		});
		const row = await plant.db
			.selectFrom('photos')
			.select(['public_id', 'full_file'])
			.executeTakeFirstOrThrow();
		await s3.send(new DeleteObjectCommand({ Bucket: fake.bucket, Key: row.full_file }));
		expect(await store.get(row.full_file)).toBeNull();
		const res = await getPhoto(row.public_id, 'full', { role: 'toolmaker', customerId: null });
		expect(res.status).toBe(404);
		expect(
			(await getPhoto(row.public_id, 'thumb', { role: 'toolmaker', customerId: null })).status
		).toBe(200);
	});

	it('a save whose transaction fails leaves no object in the bucket and no row', async () => {
		const image = await processImage(photo);
		await expect(
			storePhotoFilesWith(store, [image, image], (files) =>
				plant.db.transaction().execute(async (trx) => {
					await insertPhotoRows(
						trx,
						files,
						{ jobId, inspectionId: null, dieId: plant.dieId },
						plant.toolmaker.userId,
						'2026-03-01T08:00:00.000Z',
						null,
						null
					);
					// Written before the transaction, so both photos' objects are in the bucket now.
					expect(await bucketKeys()).toHaveLength(4);
					throw new Error('connection lost');
				})
			)
		).rejects.toThrow('connection lost');
		expect(await bucketKeys()).toEqual([]);
		expect(await plant.db.selectFrom('photos').selectAll().execute()).toEqual([]);
	});

	it('a batch that cannot be written whole is taken out of the bucket again', async () => {
		const image = await processImage(photo);
		let puts = 0;
		// The third object (the second photo's full size) fails, as a dropped connection would.
		const flaky: PhotoStore = {
			...store,
			put: (key, bytes) =>
				++puts === 3 ? Promise.reject(new Error('socket hang up')) : store.put(key, bytes)
		};
		await expect(writePhotoFiles(flaky, [image, image])).rejects.toThrow('socket hang up');
		expect(puts).toBe(3);
		expect(await bucketKeys()).toEqual([]);
	});

	it('says when the bucket cannot be used, and accepts one that can', async () => {
		expect(await store.problem()).toBeNull();
		const missing = photoStoreFromEnv({ ...fake.env, S3_BUCKET: 'no-such-bucket' });
		expect(await missing.problem()).toMatch(
			/^The photo store \(S3 bucket no-such-bucket at http:\/\/127\.0\.0\.1:\d+\) cannot be reached/
		);
	});
});

describe('the plant logo in an S3 bucket', () => {
	/** The settings page's logo action as SvelteKit calls it, for an admin. */
	async function postLogo(fields: Record<string, string | File>) {
		const body = new FormData();
		for (const [k, v] of Object.entries(fields)) body.set(k, v);
		const url = new URL('http://plant.test/settings?/logo');
		const event = {
			url,
			request: new Request(url, { method: 'POST', body }),
			params: {},
			locals: {
				user: { id: plant.lead.userId, role: 'admin', name: 'A', email: 'a@plant.test' },
				session: null
			}
		} as unknown as RequestEvent;
		return savePlantLogoAction(event);
	}

	async function logoFile() {
		const row = await plant.db
			.selectFrom('plant_settings')
			.select('logo_file')
			.executeTakeFirstOrThrow();
		return row.logo_file;
	}

	it('is stored, shown and replaced through the bucket', async () => {
		expect(await postLogo({ logo: asFile(photo, 'logo.jpg') })).toMatchObject({
			logo: { ok: true }
		});
		const first = await logoFile();
		expect(first).toMatch(/^photos\/[0-9a-f]{2}\/[0-9a-f]{32}\.thumb\.jpg$/);
		expect(await bucketKeys()).toEqual([first!.replace(/\.thumb\.jpg$/, '.jpg'), first].sort());
		const shown = await getPlantLogo({} as Parameters<typeof getPlantLogo>[0]);
		expect(shown.headers.get('content-type')).toBe('image/jpeg');
		// The logo is the thumbnail: 800 × 600 shrunk to a long side of 400.
		expect(inspectImage(Buffer.from(await shown.arrayBuffer()))).toMatchObject({
			width: 400,
			height: 300
		});

		// A new logo replaces the old one's objects; removing it leaves the bucket empty.
		expect(await postLogo({ logo: asFile(await makeJpeg(300, 200), 'new.jpg') })).toMatchObject({
			logo: { ok: true }
		});
		const second = await logoFile();
		expect(second).not.toBe(first);
		expect(await bucketKeys()).toEqual([second!.replace(/\.thumb\.jpg$/, '.jpg'), second].sort());
		expect(await postLogo({ remove: '1' })).toMatchObject({ logo: { ok: true } });
		expect(await logoFile()).toBeNull();
		expect(await bucketKeys()).toEqual([]);
		const mark = await getPlantLogo({} as Parameters<typeof getPlantLogo>[0]);
		expect(mark.headers.get('content-type')).toBe('image/svg+xml');
	});
});

describe('choosing the photo store from the environment', () => {
	it('keeps photos in UPLOAD_DIR unless PHOTO_STORE=s3', () => {
		expect(photoStoreFromEnv({ UPLOAD_DIR: '/srv/castellan/uploads' }).where).toBe(
			'folder /srv/castellan/uploads'
		);
		expect(() => photoStoreFromEnv({ PHOTO_STORE: 'ftp' })).toThrow(/PHOTO_STORE=ftp is not known/);
	});

	it('reads the S3 variables, with path-style addresses for a store of its own address', () => {
		expect(
			s3ConfigOf({
				S3_BUCKET: 'photos',
				S3_ENDPOINT: 'http://minio.plant:9000',
				S3_ACCESS_KEY_ID: 'id',
				S3_SECRET_ACCESS_KEY: 'secret'
			})
		).toEqual({
			bucket: 'photos',
			endpoint: 'http://minio.plant:9000',
			region: 'us-east-1',
			forcePathStyle: true,
			credentials: { accessKeyId: 'id', secretAccessKey: 'secret' }
		});
		// AWS itself: virtual-host addresses and the SDK's own credential chain (instance role).
		expect(s3ConfigOf({ S3_BUCKET: 'photos', S3_REGION: 'eu-central-1' })).toEqual({
			bucket: 'photos',
			endpoint: null,
			region: 'eu-central-1',
			forcePathStyle: false,
			credentials: null
		});
		expect(() => s3ConfigOf({})).toThrow(/needs S3_BUCKET/);
		expect(() => s3ConfigOf({ S3_BUCKET: 'photos', S3_ACCESS_KEY_ID: 'id' })).toThrow(
			/both S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY/
		);
	});
});
