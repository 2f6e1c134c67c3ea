// @ts-check
/**
 * The JPEG format for jimp: libvips compiled to WebAssembly (wasm-vips, its JPEG library is
 * mozjpeg with libjpeg-turbo's SIMD paths), used only as a codec. Jimp stays the image API: it
 * holds the bitmap, resizes, and calls this format's encode from getBuffer('image/jpeg').
 *
 * Why this codec: it decodes a JPEG at 1/2, 1/4 or 1/8 of its size in the DCT domain
 * (libjpeg's scale_num/scale_denom, "shrink-on-load"), so a large photo is never expanded to
 * full size in memory; and its encoder runs without mozjpeg's trellis search. The earlier
 * codec (@jsquash/jpeg) could do neither: it always decoded at full size and could not switch
 * trellis quantisation off, which kept the full-size upload path at ~15× libjpeg-turbo's own
 * command-line tools (`npm run bench`).
 *
 * Plain JavaScript that imports nothing: like image-core.js it runs inside photo worker threads
 * loaded from a data: URL, which cannot resolve bare package names, so the caller hands in the
 * absolute URL of wasm-vips (import.meta.resolve('wasm-vips')); the package finds its .wasm
 * beside its own entry file.
 */

/**
 * @typedef {object} RgbaBitmap
 * @property {Buffer} data RGBA, 4 bytes per pixel
 * @property {number} width
 * @property {number} height
 */

/** Scale factors libjpeg can decode at directly (1/1, 1/2, 1/4, 1/8). */
export const DECODE_SHRINKS = /** @type {const} */ ([1, 2, 4, 8]);

/**
 * Loads wasm-vips from its absolute URL, without the optional HEIF / JPEG XL / SVG modules, and
 * with one libvips thread: the photo pool already gives each worker thread one photo at a time.
 * @param {string} entryUrl URL of the package's Node entry (vips-node.mjs)
 */
export async function loadWasmJpeg(entryUrl) {
	const { default: Vips } = await import(entryUrl);
	const vips = await Vips({ dynamicLibraries: [], print: () => {}, printErr: () => {} });
	vips.concurrency(1);
	// No operation cache: every upload is a different file, and the cache would only hold memory.
	vips.Cache.max(0);
	return createWasmJpeg(vips);
}

/**
 * @param {any} vips an initialised wasm-vips module
 */
export function createWasmJpeg(vips) {
	/**
	 * @param {unknown} error
	 */
	function reasonOf(error) {
		const message = error instanceof Error ? error.message : String(error);
		// libvips prefixes its messages with the operation ("VipsJpeg: "); keep the first line.
		return message.split('\n').find((line) => line.trim()) ?? message;
	}

	/**
	 * Decodes to RGBA, at 1/`shrink` of the stored size when asked (1, 2, 4 or 8; the result is
	 * ceil(width / shrink) × ceil(height / shrink)). A file damaged anywhere is refused (any
	 * libjpeg warning is an error), not shown half grey. EXIF orientation is left to the caller.
	 * @param {Buffer | Uint8Array} data
	 * @param {{ shrink?: number }} [options]
	 * @returns {Promise<RgbaBitmap>}
	 */
	async function decode(data, { shrink = 1 } = {}) {
		if (!DECODE_SHRINKS.includes(/** @type {1} */ (shrink))) {
			throw new Error(`A JPEG can only be decoded at 1/1, 1/2, 1/4 or 1/8, not 1/${shrink}.`);
		}
		/** @type {any[]} */
		const made = [];
		const keep = (/** @type {any} */ image) => (made.push(image), image);
		try {
			let image = keep(
				vips.Image.jpegloadBuffer(data, { shrink, autorotate: false, fail_on: 'warning' })
			);
			// CMYK and greyscale files come out as sRGB like any other.
			if (image.interpretation !== 'srgb') image = keep(image.colourspace('srgb'));
			if (image.bands === 3) image = keep(image.bandjoin(255));
			if (image.bands !== 4) throw new Error(`unexpected ${image.bands} colour channels`);
			const pixels = /** @type {Uint8Array} */ (image.writeToMemory());
			return {
				data: Buffer.from(pixels.buffer, pixels.byteOffset, pixels.byteLength),
				width: image.width,
				height: image.height
			};
		} catch (error) {
			throw new Error(reasonOf(error), { cause: error });
		} finally {
			for (const image of made) image.delete();
		}
	}

	/**
	 * JPEG has no alpha: transparent areas (PNG) are put onto white first, in a copy, and only
	 * when there are any.
	 * @param {{ data: Buffer | Uint8Array, width: number, height: number }} bitmap
	 */
	function flattenOntoWhite(bitmap) {
		const src = bitmap.data;
		const length = bitmap.width * bitmap.height * 4;
		let i = 3;
		while (i < length && src[i] === 255) i += 4;
		if (i >= length) return src;
		const out = Buffer.from(src.subarray(0, length));
		for (let a = i; a < length; a += 4) {
			const alpha = out[a];
			if (alpha === 255) continue;
			const white = 255 * (255 - alpha);
			out[a - 3] = (out[a - 3] * alpha + white + 127) / 255;
			out[a - 2] = (out[a - 2] * alpha + white + 127) / 255;
			out[a - 1] = (out[a - 1] * alpha + white + 127) / 255;
			out[a] = 255;
		}
		return out;
	}

	/**
	 * Baseline JPEG, 4:2:0 chroma, optimised Huffman tables, no trellis search, and no metadata
	 * (the encoder is handed pixels only, and told to keep nothing).
	 * @param {{ data: Buffer | Uint8Array, width: number, height: number }} bitmap RGBA
	 * @param {{ quality?: number }} [options]
	 * @returns {Promise<Buffer>}
	 */
	async function encode(bitmap, { quality = 85 } = {}) {
		const data = flattenOntoWhite(bitmap);
		const length = bitmap.width * bitmap.height * 4;
		/** @type {any[]} */
		const made = [];
		const keep = (/** @type {any} */ image) => (made.push(image), image);
		try {
			const rgba = keep(
				vips.Image.newFromMemory(data.subarray(0, length), bitmap.width, bitmap.height, 4, 'uchar')
			);
			const rgb = keep(rgba.extractBand(0, { n: 3 }));
			const out = rgb.jpegsaveBuffer({
				Q: quality,
				optimize_coding: true,
				interlace: false,
				trellis_quant: false,
				subsample_mode: 'on',
				keep: 'none'
			});
			return Buffer.from(out.buffer, out.byteOffset, out.byteLength);
		} catch (error) {
			throw new Error(`JPEG encoding failed (${reasonOf(error)}).`, { cause: error });
		} finally {
			for (const image of made) image.delete();
		}
	}

	/** The jimp format plugin (createJimp({ formats: [jpegFormat] })). */
	const jpegFormat = () => ({
		mime: /** @type {const} */ ('image/jpeg'),
		// Alpha is handled in encode; jimp would otherwise composite every pixel itself first.
		hasAlpha: true,
		encode,
		decode: (/** @type {Buffer} */ data) => decode(data)
	});
	return { jpegFormat, decode, encode };
}
