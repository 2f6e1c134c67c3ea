// @ts-check
/**
 * Photo processing core: content sniffing, header checks, EXIF orientation, decode, resize and
 * JPEG re-encode.
 *
 * Plain JavaScript on purpose, and it imports nothing but Node built-ins: photo-worker.js loads
 * this file's *source text* from a data: URL inside each worker thread, where no TypeScript
 * transform exists and bare package names cannot be resolved. The jimp packages are therefore
 * passed in by the caller (process-image.ts in the main thread, photo-worker.js in a worker),
 * so both threads run exactly this code. See worker-pool.ts for why.
 */
import { createHash } from 'node:crypto';

/** Largest upload accepted, in bytes (20 MiB). */
export const MAX_PHOTO_BYTES = 20 * 1024 * 1024;
/** Largest image accepted, in pixels (width × height as declared in the file header). */
export const MAX_PHOTO_PIXELS = 40_000_000;
/** Long side of the stored full-size JPEG, in pixels; smaller photos are never enlarged. */
export const FULL_LONG_SIDE = 2560;
/**
 * A JPEG is decoded at 1/2, 1/4 or 1/8 of its size only while its long side stays at least this
 * (px; 1920 is the long side of a Full HD screen): see decodeShrink.
 */
export const FULL_DECODE_MIN_LONG_SIDE = 1920;
/** Long side of the thumbnail JPEG, in pixels. */
export const THUMB_LONG_SIDE = 400;

const JPEG_QUALITY = 85;

/**
 * @typedef {'empty' | 'not_image' | 'too_large' | 'too_many_pixels' | 'corrupt'} PhotoErrorCode
 */

/** A photo the uploader has to fix (wrong type, too big, damaged); the message can be shown. */
export class PhotoError extends Error {
	/**
	 * @param {PhotoErrorCode} code
	 * @param {string} message
	 */
	constructor(code, message) {
		super(message);
		this.name = 'PhotoError';
		/** @type {PhotoErrorCode} */
		this.code = code;
	}
}

/**
 * @typedef {object} ProcessedImage
 * @property {Buffer} full JPEG, long side ≤ FULL_LONG_SIDE, no metadata
 * @property {Buffer} thumb JPEG, long side ≤ THUMB_LONG_SIDE, no metadata
 * @property {number} width of `full`, px
 * @property {number} height of `full`, px
 * @property {number} originalWidth as uploaded, before EXIF orientation, px
 * @property {number} originalHeight as uploaded, before EXIF orientation, px
 * @property {'jpeg' | 'png'} sourceType
 * @property {string} sha256 hex digest of `full`
 */

/**
 * @typedef {object} ImageHeader
 * @property {'jpeg' | 'png'} type
 * @property {number} width px
 * @property {number} height px
 * @property {number} orientation EXIF orientation 1–8 (1 when absent, always 1 for PNG)
 */

/**
 * @typedef {object} ImageDeps
 * @property {typeof import('@jimp/core').createJimp} createJimp
 * @property {ReturnType<typeof import('./jpeg-codec.js').createWasmJpeg>} jpeg the WebAssembly codec
 * @property {typeof import('@jimp/js-png').default} png
 * @property {typeof import('@jimp/plugin-resize').methods} resizeMethods
 */

const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
const JPEG_EOI = Buffer.from([0xff, 0xd9]);

/** @param {Buffer | Uint8Array} input */
function asBuffer(input) {
	return Buffer.isBuffer(input) ? input : Buffer.from(input.buffer, input.byteOffset, input.length);
}

/** @param {number} bytes */
function formatMiB(bytes) {
	return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

/**
 * Names a few formats people commonly try, so the refusal says what the file actually is.
 * @param {Buffer} buf
 */
function describeOtherType(buf) {
	const ascii = (/** @type {number} */ start, /** @type {number} */ end) =>
		buf.toString('latin1', start, end);
	if (ascii(0, 4) === 'GIF8') return 'a GIF image';
	if (ascii(0, 4) === 'RIFF' && ascii(8, 12) === 'WEBP') return 'a WebP image';
	if (ascii(4, 8) === 'ftyp' && /^(heic|heix|hevc|heim|heis|mif1|msf1)$/.test(ascii(8, 12))) {
		return 'a HEIC image (iPhone: Settings → Camera → Formats → Most Compatible)';
	}
	if (ascii(0, 5) === '%PDF-') return 'a PDF document';
	return 'not an image';
}

/**
 * Reads type, declared size and orientation from the first bytes only, so an oversized image is
 * refused before any pixel memory is allocated (a "decompression bomb": a few KB of file that
 * claims 20000 × 20000 px would otherwise make the decoder allocate 1.6 GB).
 *
 * Throws PhotoError for anything that is not a complete, plausible JPEG or PNG.
 * @param {Buffer | Uint8Array} input
 * @returns {ImageHeader}
 */
export function inspectImage(input) {
	const buf = asBuffer(input);
	if (buf.length === 0) throw new PhotoError('empty', 'The file is empty.');
	if (buf.length > MAX_PHOTO_BYTES) {
		throw new PhotoError(
			'too_large',
			`The file is ${formatMiB(buf.length)}; photos may be at most ${formatMiB(MAX_PHOTO_BYTES)}.`
		);
	}
	/** @type {ImageHeader} */
	let header;
	if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) {
		header = readJpegHeader(buf);
	} else if (buf.length >= 8 && buf.subarray(0, 8).equals(PNG_SIGNATURE)) {
		header = readPngHeader(buf);
	} else {
		throw new PhotoError(
			'not_image',
			`Only JPEG and PNG photos are accepted; this file is ${describeOtherType(buf)}.`
		);
	}
	if (header.width === 0 || header.height === 0) {
		throw new PhotoError('corrupt', 'The image header gives a width or height of zero.');
	}
	const pixels = header.width * header.height;
	if (pixels > MAX_PHOTO_PIXELS) {
		const size = `${header.width} × ${header.height} px (${(pixels / 1e6).toFixed(1)} MP)`;
		throw new PhotoError(
			'too_many_pixels',
			`The image is ${size}; photos may have at most ${MAX_PHOTO_PIXELS / 1e6} MP.`
		);
	}
	return header;
}

/**
 * @param {Buffer} buf starts with the PNG signature
 * @returns {ImageHeader}
 */
function readPngHeader(buf) {
	// The first chunk must be IHDR (length 13): width and height are big-endian uint32 at 16/20.
	if (buf.length < 33) throw new PhotoError('corrupt', 'The PNG file ends inside its header.');
	if (buf.readUInt32BE(8) !== 13 || buf.toString('latin1', 12, 16) !== 'IHDR') {
		throw new PhotoError('corrupt', 'The PNG file has no valid IHDR header.');
	}
	return { type: 'png', width: buf.readUInt32BE(16), height: buf.readUInt32BE(20), orientation: 1 };
}

/** @param {number} marker */
function isStartOfFrame(marker) {
	// SOF0–SOF15 except DHT (C4), JPG (C8) and DAC (CC), which share the range.
	return marker >= 0xc0 && marker <= 0xcf && marker !== 0xc4 && marker !== 0xc8 && marker !== 0xcc;
}

/**
 * Walks the marker segments up to the first scan (SOS): the frame header (SOFn) gives the size,
 * APP1 "Exif" gives the orientation. Entropy-coded data after SOS is not parsed, except to make
 * sure an end-of-image marker follows: a lenient decoder happily decodes a progressive JPEG cut off
 * between scans, and the result would be a blurred or grey photo rather than an error.
 * @param {Buffer} buf starts with FF D8 FF
 * @returns {ImageHeader}
 */
function readJpegHeader(buf) {
	const truncated = () =>
		new PhotoError('corrupt', 'The JPEG file is incomplete (cut off before the image data).');
	let width = -1;
	let height = -1;
	let orientation = 0;
	let offset = 2;
	for (;;) {
		if (offset >= buf.length) throw truncated();
		if (buf[offset] !== 0xff) {
			throw new PhotoError('corrupt', 'The JPEG file is damaged (marker expected).');
		}
		while (offset < buf.length && buf[offset] === 0xff) offset++; // fill bytes before a marker
		if (offset >= buf.length) throw truncated();
		const marker = buf[offset++];
		if (marker === 0x01 || (marker >= 0xd0 && marker <= 0xd8)) continue; // no length field
		if (marker === 0xd9) throw truncated(); // end of image before any scan
		if (offset + 2 > buf.length) throw truncated();
		const length = buf.readUInt16BE(offset);
		const end = offset + length;
		if (length < 2 || end > buf.length) throw truncated();
		if (isStartOfFrame(marker)) {
			if (length < 8) throw new PhotoError('corrupt', 'The JPEG frame header is damaged.');
			height = buf.readUInt16BE(offset + 3);
			width = buf.readUInt16BE(offset + 5);
		} else if (marker === 0xe1 && orientation === 0) {
			orientation = readExifOrientation(buf.subarray(offset + 2, end));
		} else if (marker === 0xda) {
			if (width < 0) throw new PhotoError('corrupt', 'The JPEG file has no frame header.');
			if (buf.indexOf(JPEG_EOI, end) === -1) {
				throw new PhotoError('corrupt', 'The JPEG file is incomplete (cut off in the image data).');
			}
			return { type: 'jpeg', width, height, orientation: orientation || 1 };
		}
		offset = end;
	}
}

/**
 * Orientation tag (0x0112) from IFD0 of an APP1 payload; 0 when the segment is not Exif (XMP
 * also lives in APP1) so the caller keeps looking, 1 when Exif has no usable tag.
 * @param {Buffer} seg APP1 payload after the length field
 * @returns {number}
 */
function readExifOrientation(seg) {
	if (seg.length < 14 || seg.toString('latin1', 0, 6) !== 'Exif\0\0') return 0;
	const tiff = seg.subarray(6);
	const order = tiff.toString('latin1', 0, 2);
	if (order !== 'II' && order !== 'MM') return 1;
	const little = order === 'II';
	const u16 = (/** @type {number} */ at) =>
		little ? tiff.readUInt16LE(at) : tiff.readUInt16BE(at);
	const u32 = (/** @type {number} */ at) =>
		little ? tiff.readUInt32LE(at) : tiff.readUInt32BE(at);
	if (u16(2) !== 42) return 1;
	const ifd = u32(4);
	if (ifd + 2 > tiff.length) return 1;
	const count = u16(ifd);
	for (let i = 0; i < count; i++) {
		const entry = ifd + 2 + i * 12;
		if (entry + 12 > tiff.length) return 1;
		if (u16(entry) !== 0x0112) continue;
		// Type 3 = SHORT; the value sits left-aligned in the 4-byte value field.
		const value = u16(entry + 2) === 3 ? u16(entry + 8) : 1;
		return value >= 1 && value <= 8 ? value : 1;
	}
	return 1;
}

/**
 * @typedef {object} Bitmap
 * @property {Buffer} data RGBA, 4 bytes per pixel
 * @property {number} width
 * @property {number} height
 */

/**
 * Source-pixel step per destination step for each EXIF orientation, as [sx per x, sx per y,
 * sy per x, sy per y]; a negative step starts from the far edge. From the definition of tag
 * 0x0112 in TIFF 6.0 / Exif 2.32 (row 0 / column 0 meaning "top, left" … "left, bottom").
 * @type {Record<number, [number, number, number, number]>}
 */
const ORIENTATION_STEPS = {
	2: [-1, 0, 0, 1], // mirrored left–right
	3: [-1, 0, 0, -1], // rotated 180°
	4: [1, 0, 0, -1], // mirrored top–bottom
	5: [0, 1, 1, 0], // transposed
	6: [0, 1, -1, 0], // needs 90° clockwise (phone held upright, the usual case)
	7: [0, -1, -1, 0], // transversed
	8: [0, -1, 1, 0] // needs 90° counter-clockwise
};

/**
 * Turns the stored pixels the way EXIF says the camera was held, so the saved JPEG (which keeps
 * no EXIF) displays upright everywhere.
 * @param {Bitmap} bitmap
 * @param {number} orientation 1–8
 * @returns {Bitmap}
 */
function applyOrientation(bitmap, orientation) {
	const steps = ORIENTATION_STEPS[orientation];
	if (!steps) return bitmap;
	const [sxPerX, sxPerY, syPerX, syPerY] = steps;
	const { width: w, height: h } = bitmap;
	const outW = sxPerX === 0 ? h : w;
	const outH = sxPerX === 0 ? w : h;
	const sx0 = sxPerX < 0 || sxPerY < 0 ? w - 1 : 0;
	const sy0 = syPerX < 0 || syPerY < 0 ? h - 1 : 0;
	const src = pixelsAsUint32(bitmap.data);
	const out = Buffer.alloc(outW * outH * 4);
	const dst = new Uint32Array(out.buffer, out.byteOffset, outW * outH);
	for (let y = 0; y < outH; y++) {
		for (let x = 0; x < outW; x++) {
			const sx = sx0 + sxPerX * x + sxPerY * y;
			const sy = sy0 + syPerX * x + syPerY * y;
			dst[y * outW + x] = src[sy * w + sx];
		}
	}
	return { data: out, width: outW, height: outH };
}

/** @param {Buffer} data */
function pixelsAsUint32(data) {
	// Only whole pixels are moved, so byte order does not matter; alignment does.
	if (data.byteOffset % 4 === 0) {
		return new Uint32Array(data.buffer, data.byteOffset, data.length / 4);
	}
	return new Uint32Array(Uint8Array.from(data).buffer);
}

/**
 * @param {number} width
 * @param {number} height
 * @param {number} longSide
 * @returns {{ w: number, h: number } | null} target size, or null when already small enough
 */
function fitWithin(width, height, longSide) {
	if (width <= longSide && height <= longSide) return null;
	const scale = longSide / Math.max(width, height);
	return {
		w: Math.max(1, Math.min(longSide, Math.round(width * scale))),
		h: Math.max(1, Math.min(longSide, Math.round(height * scale)))
	};
}

/**
 * The factor (1, 2, 4 or 8) a large JPEG is decoded smaller by, in the DCT domain: the largest
 * that still leaves the long side at least FULL_DECODE_MIN_LONG_SIDE. Decoding 12 MP at full
 * size and resampling it was what kept the full-size upload path slow; a 4000 × 3000 photo is
 * decoded at 2000 × 1500 and stored at that size (still ≤ FULL_LONG_SIDE). Photos that phones
 * downscale first (≤ 2560 px) are decoded at full size.
 * @param {{ width: number, height: number }} stored the size in the file
 * @returns {number}
 */
export function decodeShrink(stored) {
	const longSide = Math.max(stored.width, stored.height);
	let shrink = 1;
	for (const next of [2, 4, 8]) {
		if (Math.ceil(longSide / next) < FULL_DECODE_MIN_LONG_SIDE) break;
		shrink = next;
	}
	return shrink;
}

/**
 * Shrinks by the largest whole factor that keeps the image at least `target` in both directions,
 * averaging each k × k block of pixels (a box filter: exact for such a factor, and one pass in
 * plain loops). Jimp's resize, much slower per source pixel, then only does the remaining
 * reduction (less than 2×). The ratio of width to height stays within a pixel of the original.
 * @param {Bitmap} bitmap
 * @param {{ w: number, h: number } | null} target the size finally wanted, in the bitmap's
 *   own orientation
 * @returns {Bitmap}
 */
export function preShrink(bitmap, target) {
	if (!target) return bitmap;
	const { width: w, height: h, data: src } = bitmap;
	const k = Math.floor(Math.min(w / target.w, h / target.h));
	if (k < 2) return bitmap;
	const outW = Math.floor(w / k);
	const outH = Math.floor(h / k);
	const out = Buffer.alloc(outW * outH * 4);
	const area = k * k;
	const half = area >> 1;
	const sums = new Uint32Array(outW * 4);
	for (let oy = 0; oy < outH; oy++) {
		sums.fill(0);
		for (let dy = 0; dy < k; dy++) {
			let s = (oy * k + dy) * w * 4;
			for (let ox = 0; ox < outW; ox++) {
				const o = ox * 4;
				for (let dx = 0; dx < k; dx++, s += 4) {
					sums[o] += src[s];
					sums[o + 1] += src[s + 1];
					sums[o + 2] += src[s + 2];
					sums[o + 3] += src[s + 3];
				}
			}
		}
		let d = oy * outW * 4;
		for (let i = 0; i < sums.length; i++) out[d++] = ((sums[i] + half) / area) | 0;
	}
	return { data: out, width: outW, height: outH };
}

/**
 * @param {ImageDeps} deps
 * @returns {(input: Buffer | Uint8Array) => Promise<ProcessedImage>}
 */
export function createImageProcessor(deps) {
	const Jimp = deps.createJimp({
		formats: [deps.jpeg.jpegFormat, deps.png],
		plugins: [deps.resizeMethods]
	});
	const pngCodec = deps.png();

	/**
	 * @param {string} type
	 * @param {unknown} error
	 */
	function damaged(type, error) {
		const reason = error instanceof Error ? error.message.split('\n')[0] : String(error);
		return new PhotoError(
			'corrupt',
			`The ${type.toUpperCase()} file is damaged and cannot be read (${reason}).`
		);
	}

	/**
	 * Decodes a JPEG at 1/`shrink` of its size (libvips/mozjpeg in WebAssembly, scaled in the DCT
	 * domain) and checks the result against its header.
	 * @param {Buffer} buf
	 * @param {ImageHeader} header
	 * @param {number} shrink 1, 2, 4 or 8
	 * @returns {Promise<Bitmap>}
	 */
	async function decodeJpeg(buf, header, shrink) {
		let decoded;
		try {
			decoded = await deps.jpeg.decode(buf, { shrink });
		} catch (error) {
			throw damaged('jpeg', error);
		}
		if (
			decoded.width !== Math.ceil(header.width / shrink) ||
			decoded.height !== Math.ceil(header.height / shrink)
		) {
			throw new PhotoError('corrupt', 'The image data does not match its header.');
		}
		return decoded;
	}

	/**
	 * @param {Buffer} buf
	 * @param {ImageHeader} header
	 * @returns {Bitmap}
	 */
	function decodePng(buf, header) {
		let decoded;
		try {
			decoded = pngCodec.decode(buf, { checkCRC: true });
		} catch (error) {
			throw damaged('png', error);
		}
		if (decoded.width !== header.width || decoded.height !== header.height) {
			throw new PhotoError('corrupt', 'The image data does not match its header.');
		}
		return { data: decoded.data, width: decoded.width, height: decoded.height };
	}

	/**
	 * Resizes to `size` (a cheap integer box shrink first, then jimp's resize for the rest) and
	 * encodes as JPEG; `null` keeps the size.
	 * @param {Bitmap} bitmap
	 * @param {{ w: number, h: number } | null} size
	 * @returns {Promise<{ bytes: Buffer, bitmap: Bitmap }>}
	 */
	async function encodeAt(bitmap, size) {
		const image = new Jimp(preShrink(bitmap, size));
		if (size && (image.width !== size.w || image.height !== size.h)) image.resize(size);
		// JPEG has no alpha: the codec flattens transparent PNG areas onto white.
		const bytes = await image.getBuffer('image/jpeg', { quality: JPEG_QUALITY });
		return { bytes, bitmap: image.bitmap };
	}

	return async function processImage(input) {
		const buf = asBuffer(input);
		const header = inspectImage(buf);
		let bitmap;
		if (header.type === 'jpeg') {
			const decoded = await decodeJpeg(buf, header, decodeShrink(header));
			const target = fitWithin(decoded.width, decoded.height, FULL_LONG_SIDE);
			// Turned upright after the first shrink, so fewer pixels are moved.
			bitmap = applyOrientation(preShrink(decoded, target), header.orientation);
		} else {
			bitmap = decodePng(buf, header);
		}
		// Sizes are worked out for the upright image.
		const fullSize = fitWithin(bitmap.width, bitmap.height, FULL_LONG_SIDE);
		const uprightW = fullSize ? fullSize.w : bitmap.width;
		const uprightH = fullSize ? fullSize.h : bitmap.height;
		const thumbSize = fitWithin(uprightW, uprightH, THUMB_LONG_SIDE);
		const full = await encodeAt(bitmap, fullSize);
		// Read before the thumbnail is made: jimp resizes the bitmap object it is given in place.
		const { width, height } = full.bitmap;
		// The thumbnail comes from the full-size bitmap: far fewer pixels to reduce.
		const thumb = await encodeAt(full.bitmap, thumbSize);
		return {
			full: full.bytes,
			thumb: thumb.bytes,
			width,
			height,
			originalWidth: header.width,
			originalHeight: header.height,
			sourceType: header.type,
			sha256: createHash('sha256').update(full.bytes).digest('hex')
		};
	};
}
