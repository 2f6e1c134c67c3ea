// @ts-check
/**
 * Task module of a photo worker thread (tinypool calls the default export once per photo).
 * Never imported by the app: worker-pool.ts hands tinypool this file's text as a data: URL,
 * with the line marked below replaced by the absolute URLs of image-core.js (another data:
 * URL), jpeg-codec.js, wasm-vips and the jimp packages — a data: module cannot resolve bare package
 * names or relative paths itself. See worker-pool.ts for why.
 */

/**
 * @typedef {object} PhotoModuleUrls
 * @property {string} core image-core.js
 * @property {string} codec jpeg-codec.js
 * @property {string} vips Node entry file of wasm-vips (its .wasm file lies beside)
 * @property {string} jimpCore
 * @property {string} png the jimp PNG format
 * @property {string} resize the jimp resize plugin
 */

/**
 * @typedef {Omit<import('./image-core.js').ProcessedImage, 'full' | 'thumb'>
 *   & { full: Uint8Array, thumb: Uint8Array }} PhotoJobResult
 */

/**
 * @typedef {{ ok: true, result: PhotoJobResult }
 *   | { ok: false, error: { message: string, code?: string } }} PhotoJobReply
 */

/** @type {PhotoModuleUrls} */
const urls = JSON.parse('__PHOTO_MODULE_URLS__');

const [core, codec, jimpCore, png, resize] = await Promise.all([
	/** @type {Promise<typeof import('./image-core.js')>} */ (import(urls.core)),
	/** @type {Promise<typeof import('./jpeg-codec.js')>} */ (import(urls.codec)),
	/** @type {Promise<typeof import('@jimp/core')>} */ (import(urls.jimpCore)),
	/** @type {Promise<typeof import('@jimp/js-png')>} */ (import(urls.png)),
	/** @type {Promise<typeof import('@jimp/plugin-resize')>} */ (import(urls.resize))
]);

const processImage = core.createImageProcessor({
	createJimp: jimpCore.createJimp,
	jpeg: await codec.loadWasmJpeg(urls.vips),
	png: png.default,
	resizeMethods: resize.methods
});

/**
 * @param {Uint8Array} bytes
 * @returns {Promise<PhotoJobReply>}
 */
export default async function processPhoto(bytes) {
	try {
		const result = await processImage(bytes);
		return {
			ok: true,
			result: { ...result, full: new Uint8Array(result.full), thumb: new Uint8Array(result.thumb) }
		};
	} catch (error) {
		const message = error instanceof Error ? error.message : String(error);
		// The class does not survive the thread boundary; its code does, and the pool rebuilds it.
		const code = error instanceof core.PhotoError ? error.code : undefined;
		return { ok: false, error: { message, code } };
	}
}
