/**
 * Runs photo decoding and resizing on worker threads, so a 40 MP upload (seconds of pure
 * JavaScript in jpeg-js) never stalls other requests.
 *
 * How the worker is loaded, and why: the obvious `new Worker(new URL('./photo-worker.ts',
 * import.meta.url))` breaks in production. Vite rewrites that pattern for client code only; in
 * the SSR build the URL is left as is, resolves next to the bundled chunk in
 * build/server/chunks/, and no such file is emitted. Pointing the worker at a server chunk
 * instead is not safe either, as a chunk may carry unrelated modules (database, env) that
 * would run inside the worker. So the worker code travels as text:
 *  - photo-worker.js and image-core.js are plain JS that import only Node built-ins;
 *  - under Vite (dev server, vitest, `vite build`) `import.meta.glob(…, { query: '?raw' })`
 *    inlines both files as strings; under tsx, which has no import.meta.glob, they are read
 *    from disk next to this file (where the sources are, as tsx only runs from the source tree);
 *  - the worker starts from a data: URL of photo-worker.js, which imports image-core.js from a
 *    data: URL too, and the jimp packages from absolute URLs resolved here with
 *    import.meta.resolve (data: modules cannot resolve bare package names themselves).
 * The main thread runs the same image-core.js via process-image.ts, so both paths agree.
 */
import { readFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { PhotoError, inspectImage } from './process-image';
import type { PhotoErrorCode, ProcessedImage } from './process-image';
import type { PhotoJob, PhotoJobReply, PhotoJobResult, PhotoWorkerData } from './photo-worker.js';

/** Worker threads in the shared pool: one core stays with the request loop; at most two. */
export const PHOTO_POOL_SIZE = Math.max(1, Math.min(2, availableParallelism() - 1));

export interface PhotoPool {
	/** Same contract as processImage, run on a worker thread; jobs beyond the pool size queue. */
	process(buffer: Buffer | Uint8Array): Promise<ProcessedImage>;
	/** Stops the workers; queued and running jobs are rejected. */
	close(): Promise<void>;
}

interface Job {
	id: number;
	bytes: Uint8Array;
	resolve: (image: ProcessedImage) => void;
	reject: (error: Error) => void;
}

interface Slot {
	worker: Worker;
	job: Job | null;
}

interface WorkerStart {
	entry: URL;
	workerData: PhotoWorkerData;
}

let workerStart: WorkerStart | undefined;

function toDataUrl(source: string): string {
	return `data:text/javascript;base64,${Buffer.from(source).toString('base64')}`;
}

function readWorkerSources(): { worker: string; core: string } {
	let inlined: Record<string, string> = {};
	try {
		inlined = import.meta.glob<string>(['./photo-worker.js', './image-core.js'], {
			query: '?raw',
			import: 'default',
			eager: true
		});
	} catch {
		// Not under Vite (tsx): import.meta.glob does not exist; read the files below.
	}
	const read = (name: string) =>
		inlined[name] ?? readFileSync(new URL(name, import.meta.url), 'utf8');
	return { worker: read('./photo-worker.js'), core: read('./image-core.js') };
}

function getWorkerStart(): WorkerStart {
	if (!workerStart) {
		const sources = readWorkerSources();
		workerStart = {
			entry: new URL(toDataUrl(sources.worker)),
			workerData: {
				coreUrl: toDataUrl(sources.core),
				moduleUrls: {
					jimpCore: import.meta.resolve('@jimp/core'),
					jpeg: import.meta.resolve('@jimp/js-jpeg'),
					png: import.meta.resolve('@jimp/js-png'),
					resize: import.meta.resolve('@jimp/plugin-resize')
				}
			}
		};
	}
	return workerStart;
}

function toBuffer(bytes: Uint8Array): Buffer {
	return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

function fromResult(result: PhotoJobResult): ProcessedImage {
	return { ...result, full: toBuffer(result.full), thumb: toBuffer(result.thumb) };
}

export function createPhotoPool(size: number = PHOTO_POOL_SIZE): PhotoPool {
	const queue: Job[] = [];
	const slots = new Set<Slot>();
	let nextId = 1;
	let closed = false;

	function spawn(): Slot {
		const { entry, workerData } = getWorkerStart();
		const worker = new Worker(entry, { workerData, name: 'castellan-photo' });
		const slot: Slot = { worker, job: null };
		slots.add(slot);
		worker.on('message', (reply: PhotoJobReply) => {
			const job = slot.job;
			if (!job || job.id !== reply.id) return;
			if (reply.ok) {
				job.resolve(fromResult(reply.result));
			} else if (reply.error.code) {
				job.reject(new PhotoError(reply.error.code as PhotoErrorCode, reply.error.message));
			} else {
				job.reject(new Error(`Photo processing failed: ${reply.error.message}`));
			}
			slot.job = null;
			// An idle worker must not keep a script or test process alive.
			worker.unref();
			pump();
		});
		// 'error' (uncaught in the worker, including running out of memory) is followed by
		// 'exit'; whichever comes first retires the slot and fails only the job it was running.
		worker.on('error', (error) => retire(slot, error));
		worker.on('exit', (code) => retire(slot, new Error(`worker exited with code ${code}`)));
		return slot;
	}

	function retire(slot: Slot, error: Error) {
		if (!slots.delete(slot)) return;
		slot.job?.reject(new Error(`Photo worker failed: ${error.message}`, { cause: error }));
		slot.job = null;
		pump();
	}

	function pump() {
		while (!closed && queue.length > 0) {
			let slot = [...slots].find((candidate) => candidate.job === null);
			const job = queue[0];
			if (!slot) {
				if (slots.size >= size) return;
				try {
					slot = spawn();
				} catch (error) {
					queue.shift();
					job.reject(new Error('Photo worker could not start', { cause: error }));
					continue;
				}
			}
			queue.shift();
			slot.job = job;
			slot.worker.ref();
			const message: PhotoJob = { id: job.id, bytes: job.bytes };
			slot.worker.postMessage(message, [job.bytes.buffer as ArrayBuffer]);
		}
	}

	return {
		async process(buffer) {
			if (closed) throw new Error('The photo pool is closed.');
			// Type, size and declared dimensions are cheap to check here, so a wrong file is
			// refused at once instead of waiting in the queue behind real photos.
			inspectImage(buffer);
			// A compact copy we own: transferring it is free, and the caller's buffer stays intact.
			const bytes = new Uint8Array(buffer);
			return new Promise<ProcessedImage>((resolve, reject) => {
				queue.push({ id: nextId++, bytes, resolve, reject });
				pump();
			});
		},

		async close() {
			closed = true;
			const stopped = new Error('The photo pool was closed.');
			for (const job of queue.splice(0)) job.reject(stopped);
			const running = [...slots];
			slots.clear();
			for (const slot of running) slot.job?.reject(stopped);
			await Promise.all(running.map((slot) => slot.worker.terminate()));
		}
	};
}

let sharedPool: PhotoPool | undefined;

/**
 * processImage on the shared worker pool (PHOTO_POOL_SIZE threads, queued beyond that).
 * Rejects with PhotoError, code and message intact, for a file the uploader has to fix.
 */
export function processImageInPool(buffer: Buffer | Uint8Array): Promise<ProcessedImage> {
	sharedPool ??= createPhotoPool();
	return sharedPool.process(buffer);
}

/** Stops the shared pool's workers (tests, graceful shutdown); the next call starts a new pool. */
export async function closePhotoPool(): Promise<void> {
	const pool = sharedPool;
	sharedPool = undefined;
	await pool?.close();
}
