// @ts-check
/**
 * Entry module of a photo worker thread. Never imported: worker-pool.ts starts each worker from
 * a data: URL holding this file's text, so it may import Node built-ins only. image-core.js
 * arrives the same way, and the jimp packages as absolute file: URLs resolved by the pool.
 */
import { parentPort, workerData } from 'node:worker_threads';

/**
 * @typedef {object} PhotoWorkerData
 * @property {string} coreUrl data: URL with the source of image-core.js
 * @property {{ jimpCore: string, jpeg: string, png: string, resize: string }} moduleUrls
 *   absolute URLs of @jimp/core, @jimp/js-jpeg, @jimp/js-png and @jimp/plugin-resize
 */

/** @typedef {{ id: number, bytes: Uint8Array }} PhotoJob */

/**
 * @typedef {Omit<import('./image-core.js').ProcessedImage, 'full' | 'thumb'>
 *   & { full: Uint8Array, thumb: Uint8Array }} PhotoJobResult
 */

/**
 * @typedef {{ id: number, ok: true, result: PhotoJobResult }
 *   | { id: number, ok: false, error: { message: string, code?: string } }} PhotoJobReply
 */

const port = parentPort;
if (!port) throw new Error('photo-worker.js runs only inside a worker thread.');
const { coreUrl, moduleUrls } = /** @type {PhotoWorkerData} */ (workerData);

const [core, jimpCore, jpeg, png, resize] = await Promise.all([
	/** @type {Promise<typeof import('./image-core.js')>} */ (import(coreUrl)),
	/** @type {Promise<typeof import('@jimp/core')>} */ (import(moduleUrls.jimpCore)),
	/** @type {Promise<typeof import('@jimp/js-jpeg')>} */ (import(moduleUrls.jpeg)),
	/** @type {Promise<typeof import('@jimp/js-png')>} */ (import(moduleUrls.png)),
	/** @type {Promise<typeof import('@jimp/plugin-resize')>} */ (import(moduleUrls.resize))
]);

const processImage = core.createImageProcessor({
	createJimp: jimpCore.createJimp,
	jpeg: jpeg.default,
	png: png.default,
	resizeMethods: resize.methods
});

port.on('message', async (/** @type {PhotoJob} */ job) => {
	/** @type {PhotoJobReply} */
	let reply;
	/** @type {ArrayBuffer[]} */
	let transfer = [];
	try {
		const result = await processImage(job.bytes);
		// Own copies, so transferring cannot detach a pooled Buffer slab still in use here.
		const full = new Uint8Array(result.full);
		const thumb = new Uint8Array(result.thumb);
		reply = { id: job.id, ok: true, result: { ...result, full, thumb } };
		transfer = [full.buffer, thumb.buffer];
	} catch (error) {
		const message = error instanceof Error ? error.message : String(error);
		// The class does not survive postMessage; its code does, and the pool rebuilds it.
		const code = error instanceof core.PhotoError ? error.code : undefined;
		reply = { id: job.id, ok: false, error: { message, code } };
	}
	port.postMessage(reply, transfer);
});
