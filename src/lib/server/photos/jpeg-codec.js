// @ts-check
/**
 * The JPEG format for jimp: mozjpeg compiled to WebAssembly (@jsquash/jpeg), so decoding and
 * encoding run at near-native speed without a native addon. Jimp stays the image API: it holds
 * the bitmap, resizes, and calls this format's encode from getBuffer('image/jpeg'). The
 * pure-JavaScript codec (jpeg-js) took ~40× the time of libjpeg-turbo's own command-line tools
 * on a 12 MP photo.
 *
 * Plain JavaScript that imports only Node built-ins: like image-core.js it runs inside photo
 * worker threads loaded from a data: URL, which cannot resolve bare package names, so the caller
 * hands in the absolute URL of @jsquash/jpeg (import.meta.resolve('@jsquash/jpeg')). The .wasm
 * files are read from beside it and compiled here: the Emscripten glue would otherwise fetch
 * them, which Node cannot do from a file: URL.
 */
import { readFile } from 'node:fs/promises';

/**
 * Fast, plain output: baseline, one scan, 4:2:0 chroma. The slow mozjpeg extras are off as far
 * as the build allows: no progressive scans, no multi-pass or EOB/table trellis search, one
 * trellis loop. Trellis quantisation itself cannot be switched off: the codec's encode() has no
 * option for JBOOLEAN_TRELLIS_QUANT, which mozjpeg's jpeg_set_defaults turns on.
 *
 * optimize_coding stays on, against intuition: with it off (the standard Huffman tables) this
 * build writes 4:2:0 files that libjpeg itself rejects ("Corrupt JPEG data: bad Huffman code"),
 * and with it on encoding was also faster (≈ 320 ms against 410 ms for 2560 × 1920) and the
 * files smaller.
 */
const ENCODE_OPTIONS = {
	baseline: true,
	arithmetic: false,
	progressive: false,
	optimize_coding: true,
	smoothing: 0,
	color_space: 3, // YCbCr
	quant_table: 3, // mozjpeg's default table
	trellis_multipass: false,
	trellis_opt_zero: false,
	trellis_opt_table: false,
	trellis_loops: 1,
	auto_subsample: false,
	chroma_subsample: 2, // 2 × 2: 4:2:0
	separate_chroma_quality: false,
	chroma_quality: 85
};

/**
 * @typedef {object} RgbaBitmap
 * @property {Buffer} data RGBA, 4 bytes per pixel
 * @property {number} width
 * @property {number} height
 */

/**
 * One of the package's decode.js / encode.js modules.
 * @typedef {{
 *   init: (module: WebAssembly.Module, options?: object) => Promise<void>,
 *   default: (input: any, options?: object) => Promise<any>
 * }} JsquashCodec
 */

/**
 * Loads @jsquash/jpeg from its absolute URL and compiles its two WebAssembly modules.
 * @param {string} entryUrl URL of the package's entry file (its index.js)
 */
export async function loadWasmJpeg(entryUrl) {
	const base = new URL('./', entryUrl);
	const [decoder, encoder, decoderWasm, encoderWasm] = await Promise.all([
		/** @type {Promise<JsquashCodec>} */ (import(new URL('decode.js', base).href)),
		/** @type {Promise<JsquashCodec>} */ (import(new URL('encode.js', base).href)),
		readFile(new URL('codec/dec/mozjpeg_dec.wasm', base)).then((b) => WebAssembly.compile(b)),
		readFile(new URL('codec/enc/mozjpeg_enc.wasm', base)).then((b) => WebAssembly.compile(b))
	]);
	return createWasmJpeg({ decoder, encoder, decoderWasm, encoderWasm });
}

/**
 * @param {{ decoder: JsquashCodec, encoder: JsquashCodec,
 *   decoderWasm: WebAssembly.Module, encoderWasm: WebAssembly.Module }} parts
 */
export function createWasmJpeg({ decoder, encoder, decoderWasm, encoderWasm }) {
	/** libjpeg's warnings ("Corrupt JPEG data: …") arrive on stderr, i.e. printErr. */
	/** @type {string[]} */
	let messages = [];
	const moduleOptions = {
		printErr: (/** @type {string} */ line) => messages.push(String(line)),
		print: () => {}
	};
	let decoderReady = decoder.init(decoderWasm, moduleOptions);
	let encoderReady = encoder.init(encoderWasm, moduleOptions);

	// The codecs are synchronous inside WebAssembly, but their JS wrappers await: one call at a
	// time per thread, so the messages collected belong to the call that reads them.
	/** @type {Promise<unknown>} */
	let queue = Promise.resolve();
	/**
	 * @template T
	 * @param {() => Promise<T>} task
	 * @returns {Promise<T>}
	 */
	function serial(task) {
		const run = queue.then(task, task);
		queue = run.catch(() => {});
		return run;
	}

	/**
	 * Decodes to RGBA at full size. A file damaged anywhere is refused (any libjpeg warning is an
	 * error), not shown half grey. After a failure the decoder is instantiated afresh: libjpeg
	 * leaves it by exit(), which frees nothing it had allocated.
	 * @param {Buffer | Uint8Array} data
	 * @returns {Promise<RgbaBitmap>}
	 */
	function decode(data) {
		return serial(async () => {
			await decoderReady;
			messages = [];
			let image;
			try {
				image = await decoder.default(data, { preserveOrientation: false });
			} catch (error) {
				decoderReady = decoder.init(decoderWasm, moduleOptions);
				const reason = messages[0] ?? (error instanceof Error ? error.message : String(error));
				throw new Error(reason, { cause: error });
			}
			if (messages.length > 0) throw new Error(messages[0]);
			const pixels = /** @type {Uint8ClampedArray} */ (image.data);
			return {
				data: Buffer.from(pixels.buffer, pixels.byteOffset, pixels.byteLength),
				width: image.width,
				height: image.height
			};
		});
	}

	/**
	 * JPEG has no alpha and the encoder ignores it: transparent areas (PNG) are put onto white
	 * first, in a copy, and only when there are any.
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
	 * Writes no metadata: mozjpeg's encoder is handed pixels only.
	 * @param {{ data: Buffer | Uint8Array, width: number, height: number }} bitmap RGBA
	 * @param {{ quality?: number }} [options]
	 * @returns {Promise<Buffer>}
	 */
	function encode(bitmap, { quality = 85 } = {}) {
		const data = flattenOntoWhite(bitmap);
		return serial(async () => {
			await encoderReady;
			messages = [];
			/** @type {ArrayBuffer | undefined} */
			let out;
			try {
				out = await encoder.default(
					{ data, width: bitmap.width, height: bitmap.height },
					{ ...ENCODE_OPTIONS, quality, chroma_quality: quality }
				);
			} catch (error) {
				encoderReady = encoder.init(encoderWasm, moduleOptions);
				throw error;
			}
			// On a libjpeg error the codec returns the message, a string, whose .buffer is undefined.
			if (!(out instanceof ArrayBuffer)) {
				throw new Error(`JPEG encoding failed${messages[0] ? ` (${messages[0]})` : ''}.`);
			}
			return Buffer.from(out);
		});
	}

	/** The jimp format plugin (createJimp({ formats: [jpegFormat] })). */
	const jpegFormat = () => ({
		mime: /** @type {const} */ ('image/jpeg'),
		// Alpha is handled in encode; jimp would otherwise composite every pixel itself first.
		hasAlpha: true,
		encode,
		decode
	});
	return { jpegFormat, decode, encode };
}
