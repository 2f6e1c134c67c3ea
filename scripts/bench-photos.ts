// Photo upload speed: a generated 12-megapixel JPEG through the real upload path (content
// checks, worker pool, files on disk, rows in one transaction) against bare jimp
// decode-resize-encode of the same image on the calling thread; and how responsive the process
// stays while 4 such uploads run: event-loop delay and the latency of simple database reads.
//   npx tsx scripts/bench-photos.ts        (also part of `npm run bench`)
import { runWhenCalledDirectly, type BenchFigure } from './lib/bench-report';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { createJimp } from '@jimp/core';
import jpeg from '@jimp/js-jpeg';
import { methods as resizeMethods } from '@jimp/plugin-resize';
import { migrateToLatest, openDatabase, type DB } from '../src/lib/server/db/connect';
import { FULL_LONG_SIDE, THUMB_LONG_SIDE } from '../src/lib/server/photos/process-image';
import { closePhotoPool, PHOTO_POOL_SIZE } from '../src/lib/server/photos/worker-pool';
import { listOpenJobs } from '../src/lib/server/toolroom/board';
import { uploadPhotos } from '../src/lib/server/toolroom/photos';

const WIDTH = 4000;
const HEIGHT = 3000; // 12 MP
const RATIO_TARGET = 1.5;
const P95_TARGET_MS = 100;
const RUNS = 3;

const Jimp = createJimp({ formats: [jpeg], plugins: [resizeMethods] });

/** A photo-like 12 MP JPEG: smooth light falloff plus fine noise (noise keeps it from compressing to nothing). */
async function makeTwelveMegapixelJpeg(): Promise<Buffer> {
	const data = Buffer.alloc(WIDTH * HEIGHT * 4);
	let s = 12345;
	for (let y = 0; y < HEIGHT; y++) {
		for (let x = 0; x < WIDTH; x++) {
			s = (Math.imul(s, 1_664_525) + 1_013_904_223) >>> 0;
			const noise = (s >>> 24) / 16;
			const i = (y * WIDTH + x) * 4;
			const light = 90 + 80 * Math.sin(x / 700) * Math.cos(y / 500);
			data[i] = light + noise;
			data[i + 1] = light + 10 + noise;
			data[i + 2] = light + 25 + noise;
			data[i + 3] = 255;
		}
	}
	return new Jimp({ data, width: WIDTH, height: HEIGHT }).getBuffer('image/jpeg', { quality: 90 });
}

/** The bare work: decode, resize to the full and thumbnail sizes, encode both — one thread. */
async function bareJimp(bytes: Buffer): Promise<void> {
	const image = await Jimp.fromBuffer(bytes);
	for (const long of [FULL_LONG_SIDE, THUMB_LONG_SIDE]) {
		const scale = long / Math.max(image.width, image.height);
		image.resize({ w: Math.round(image.width * scale), h: Math.round(image.height * scale) });
		await image.getBuffer('image/jpeg', { quality: 85 });
	}
}

async function seedJob(db: DB): Promise<number> {
	await db.insertInto('customers').values({ code: 'BENCH', name: 'Bench Castings' }).execute();
	await db
		.insertInto('users')
		.values({
			id: 'bench-maker',
			email: 'maker@bench.test',
			name: 'Maker',
			role: 'toolmaker',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	const alloy = await db.selectFrom('alloys').select('id').executeTakeFirstOrThrow();
	const die = await db
		.insertInto('dies')
		.values({
			number: 'B-0001',
			part_name: 'Bench part',
			customer_id: 1,
			alloy_id: alloy.id,
			process: 'cold_chamber',
			cavities: 1,
			projected_area_cm2: 100
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	const at = new Date().toISOString();
	const job = await db
		.insertInto('toolroom_jobs')
		.values({
			number: 'TJ-90001',
			die_id: die.id,
			kind: 'repair',
			half: 'cover',
			description: 'Bench',
			source: 'die',
			die_shots_at_open: 0,
			opened_at: at,
			updated_at: at,
			opened_by: 'bench-maker',
			zone: null,
			assigned_to: null,
			notice_id: null,
			closed_at: null,
			closed_by: null,
			die_shots_at_close: null,
			findings: null,
			work_done: null,
			hours: null,
			parts_used: null,
			owner_summary: null,
			cancel_reason: null
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	return job.id;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const percentile = (xs: number[], p: number) => {
	const sorted = [...xs].sort((a, b) => a - b);
	return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
};

export async function run(): Promise<BenchFigure[]> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-bench-photos-'));
	const db = openDatabase(path.join(dir, 'bench.db'));
	try {
		await migrateToLatest(db);
		const jobId = await seedJob(db);
		const uploadDir = path.join(dir, 'uploads');
		const photo = await makeTwelveMegapixelJpeg();
		const actor = { userId: 'bench-maker', role: 'toolmaker' as const };
		const upload = (n: number) =>
			uploadPhotos(db, {
				target: { jobId },
				files: Array.from({ length: n }, (_, i) => new File([new Uint8Array(photo)], `p${i}.jpg`)),
				actor,
				uploadDir
			});

		// Warm both paths once (module loading, worker start) before timing.
		await bareJimp(photo);
		const warm = await upload(1);
		if (!warm.ok) throw new Error(warm.message);

		const bare: number[] = [];
		const through: number[] = [];
		for (let i = 0; i < RUNS; i++) {
			let t = performance.now();
			await bareJimp(photo);
			bare.push(performance.now() - t);
			t = performance.now();
			const result = await upload(1);
			through.push(performance.now() - t);
			if (!result.ok) throw new Error(result.message);
		}
		const bareMs = median(bare);
		const uploadMs = median(through);

		// Responsiveness while 4 uploads run: a simple board query every 10 ms, and the
		// event-loop delay over the same window.
		const loop = monitorEventLoopDelay({ resolution: 5 });
		const reads: number[] = [];
		let busy = true;
		const reader = (async () => {
			while (busy) {
				const t = performance.now();
				await listOpenJobs(db, { status: '', toolmaker: '', die: '' });
				reads.push(performance.now() - t);
				await new Promise((r) => setTimeout(r, 10));
			}
		})();
		loop.enable();
		const started = performance.now();
		const results = await Promise.all([upload(1), upload(1), upload(1), upload(1)]);
		const concurrentMs = performance.now() - started;
		loop.disable();
		busy = false;
		await reader;
		if (results.some((r) => !r.ok)) throw new Error('A concurrent upload failed.');
		const loopP95 = loop.percentile(95) / 1e6;
		const readP95 = percentile(reads, 95);

		console.log(
			`  12 MP JPEG ${(photo.length / 1024 / 1024).toFixed(1)} MB; pool of ${PHOTO_POOL_SIZE} worker(s) on ${os.availableParallelism()} cores; ` +
				`bare ${bare.map((m) => m.toFixed(0)).join('/')} ms, upload ${through.map((m) => m.toFixed(0)).join('/')} ms; ` +
				`4 uploads in ${concurrentMs.toFixed(0)} ms, ${reads.length} reads`
		);
		const ratio = uploadMs / bareMs;
		return [
			{
				figure: 'photos: bare jimp decode-resize-encode, 12 MP',
				value: bareMs,
				unit: 'ms',
				target: 'reference',
				pass: true
			},
			{
				figure: 'photos: upload path per photo, 12 MP',
				value: uploadMs,
				unit: 'ms',
				target: `≤ ${RATIO_TARGET}× bare jimp`,
				ratio,
				pass: ratio <= RATIO_TARGET
			},
			{
				figure: 'photos: p95 simple DB read during 4 uploads',
				value: readP95,
				unit: 'ms',
				target: `< ${P95_TARGET_MS} ms`,
				pass: readP95 < P95_TARGET_MS
			},
			{
				figure: 'photos: p95 event-loop delay during 4 uploads',
				value: loopP95,
				unit: 'ms',
				target: `< ${P95_TARGET_MS} ms`,
				pass: loopP95 < P95_TARGET_MS
			}
		];
	} finally {
		await closePhotoPool();
		await db.destroy();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

await runWhenCalledDirectly(import.meta.url, run);
