/**
 * Runs photo checks and re-encoding on worker threads (a tinypool pool), so the pixel work in
 * WebAssembly and JavaScript — JPEG (mozjpeg) and PNG decoding, resizing, encoding — never
 * stalls other requests.
 *
 * How the worker is loaded, and why: the obvious `new URL('./photo-worker.js',
 * import.meta.url)` breaks in production. Vite rewrites that pattern for client code only; in
 * the SSR build the URL is left as is, resolves next to the bundled chunk in
 * build/server/chunks/, and no such file is emitted. Pointing the worker at a server chunk
 * instead is not safe either, as a chunk may carry unrelated modules (database, env) that
 * would run inside the worker. So the worker code travels as text:
 *  - photo-worker.js, image-core.js and jpeg-codec.js are plain JS that import only Node
 *    built-ins;
 *  - under Vite (dev server, vitest, `vite build`) `import.meta.glob(…, { query: '?raw' })`
 *    inlines the files as strings; under tsx, which has no import.meta.glob, they are read
 *    from disk next to this file (where the sources are, as tsx only runs from the source tree);
 *  - tinypool starts photo-worker.js from a data: URL, with the URLs of image-core.js and
 *    jpeg-codec.js (data: URLs too) and of wasm-vips and the jimp packages (absolute,
 *    resolved here with import.meta.resolve) written into its text; each worker compiles the
 *    codec's .wasm file, found beside wasm-vips's entry, once when it starts.
 * The main thread runs the same image-core.js via process-image.ts, so both paths agree.
 */
import { readFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import Tinypool from 'tinypool';
import { PhotoError, inspectImage } from './process-image';
import type { PhotoErrorCode, ProcessedImage } from './process-image';
import type { PhotoJobReply, PhotoModuleUrls } from './photo-worker.js';

/** Worker threads in the shared pool: one core stays with the request loop; at most two. */
export const PHOTO_POOL_SIZE = Math.max(1, Math.min(2, availableParallelism() - 1));

export interface PhotoPool {
	/** Same contract as processImage, run on a worker thread; jobs beyond the pool size queue. */
	process(buffer: Buffer | Uint8Array): Promise<ProcessedImage>;
	/** Stops the workers; queued and running jobs are rejected. */
	close(): Promise<void>;
}

const SOURCES = ['./photo-worker.js', './image-core.js', './jpeg-codec.js'] as const;
type SourceName = (typeof SOURCES)[number];

let workerUrl: string | undefined;

function toDataUrl(source: string): string {
	return `data:text/javascript;base64,${Buffer.from(source).toString('base64')}`;
}

function readWorkerSources(): Record<SourceName, string> {
	let inlined: Record<string, string> = {};
	try {
		inlined = import.meta.glob<string>(
			['./photo-worker.js', './image-core.js', './jpeg-codec.js'],
			{
				query: '?raw',
				import: 'default',
				eager: true
			}
		);
	} catch {
		// Not under Vite (tsx): import.meta.glob does not exist; read the files below.
	}
	const read = (name: SourceName) =>
		inlined[name] ?? readFileSync(new URL(name, import.meta.url), 'utf8');
	return Object.fromEntries(SOURCES.map((name) => [name, read(name)])) as Record<
		SourceName,
		string
	>;
}

function getWorkerUrl(): string {
	if (!workerUrl) {
		const sources = readWorkerSources();
		const urls: PhotoModuleUrls = {
			core: toDataUrl(sources['./image-core.js']),
			codec: toDataUrl(sources['./jpeg-codec.js']),
			vips: import.meta.resolve('wasm-vips'),
			jimpCore: import.meta.resolve('@jimp/core'),
			png: import.meta.resolve('@jimp/js-png'),
			resize: import.meta.resolve('@jimp/plugin-resize')
		};
		// JSON inside a single-quoted JS string: escape what would end or bend that string.
		const literal = JSON.stringify(urls).replace(/\\/g, '\\\\').replace(/'/g, "\\'");
		workerUrl = toDataUrl(sources['./photo-worker.js'].replace('__PHOTO_MODULE_URLS__', literal));
	}
	return workerUrl;
}

function toBuffer(bytes: Uint8Array): Buffer {
	return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

export function createPhotoPool(size: number = PHOTO_POOL_SIZE): PhotoPool {
	let closed = false;
	let pool: Tinypool | undefined;
	const closedError = () => new Error('The photo pool was closed.');

	return {
		async process(buffer) {
			if (closed) throw closedError();
			// Type, size and declared dimensions are cheap to check here, so a wrong file is
			// refused at once instead of waiting in the queue behind real photos.
			inspectImage(buffer);
			pool ??= new Tinypool({
				filename: getWorkerUrl(),
				minThreads: 0,
				maxThreads: size,
				// Workers stay warm between uploads and are not kept for an idle server.
				idleTimeout: 60_000
			});
			// A compact copy we own: transferring it is free, and the caller's buffer stays intact.
			const bytes = new Uint8Array(buffer);
			let reply: PhotoJobReply;
			try {
				reply = await pool.run(bytes, { transferList: [bytes.buffer as ArrayBuffer] });
			} catch (error) {
				// A worker failure (out of memory, crash) is ours; tinypool replaces the worker.
				if (closed) throw closedError();
				throw new Error(`Photo worker failed: ${(error as Error).message}`, { cause: error });
			}
			if (reply.ok) {
				const { result } = reply;
				return { ...result, full: toBuffer(result.full), thumb: toBuffer(result.thumb) };
			}
			if (reply.error.code) {
				throw new PhotoError(reply.error.code as PhotoErrorCode, reply.error.message);
			}
			throw new Error(`Photo processing failed: ${reply.error.message}`);
		},

		async close() {
			closed = true;
			await pool?.destroy();
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
