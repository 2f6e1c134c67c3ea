// @ts-check
/**
 * A fast JPEG format for jimp, backed by sharp (libvips with libjpeg-turbo/mozjpeg, native code
 * from npm's prebuilt packages). Jimp stays the image API: it holds the bitmap, resizes, and
 * calls this format's encode from getBuffer('image/jpeg'); only the two costly steps, decoding
 * and encoding, leave JavaScript. The pure-JavaScript codec (jpeg-js) took ~40× the time of
 * libjpeg-turbo's own command-line tools on a 12 MP photo.
 *
 * Plain JavaScript that imports nothing: like image-core.js it runs inside photo worker threads
 * loaded from a data: URL, so sharp is handed in by the caller.
 */

/**
 * @typedef {object} JpegDecodeOptions
 * @property {{ w: number, h: number }} [size] decode straight to this size: libjpeg's DCT
 *   scaling (as `djpeg -scale 1/2`) does most of a large reduction while decoding, libvips the
 *   rest — far cheaper than decoding in full and resizing
 * @property {number} [maxPixels] refuse images above this many pixels
 */

/**
 * @param {typeof import('sharp').default} sharp
 */
export function createSharpJpeg(sharp) {
	// libvips keeps a cache of recent operations, which a server decoding each photo once only
	// fills with memory; its own thread pool stays at one thread per worker (the pool is ours).
	sharp.cache(false);
	sharp.concurrency(1);

	/**
	 * @param {Buffer} data
	 * @param {JpegDecodeOptions} [options]
	 * @returns {Promise<{ data: Buffer, width: number, height: number }>}
	 */
	async function decode(data, options = {}) {
		let pipeline = sharp(data, {
			// A file damaged or cut off anywhere is refused, not shown half grey.
			failOn: 'warning',
			limitInputPixels: options.maxPixels ?? 268402689,
			autoOrient: false
		});
		if (options.size) {
			pipeline = pipeline.resize({
				width: options.size.w,
				height: options.size.h,
				fit: 'fill',
				fastShrinkOnLoad: true
			});
		}
		const { data: pixels, info } = await pipeline
			.toColourspace('srgb')
			.ensureAlpha()
			.raw()
			.toBuffer({ resolveWithObject: true });
		return { data: pixels, width: info.width, height: info.height };
	}

	/**
	 * @param {{ data: Buffer | Uint8Array, width: number, height: number }} bitmap RGBA
	 * @param {{ quality?: number }} [options]
	 * @returns {Promise<Buffer>}
	 */
	function encode(bitmap, { quality = 85 } = {}) {
		// No metadata is copied: sharp writes EXIF/ICC only when asked (withMetadata).
		return (
			sharp(bitmap.data, {
				raw: { width: bitmap.width, height: bitmap.height, channels: 4 }
			})
				// Transparent areas (PNG) become white, not black. Done here rather than by jimp, which
				// would otherwise composite every pixel in JavaScript onto its background first.
				.flatten({ background: '#ffffff' })
				.jpeg({ quality, mozjpeg: false, chromaSubsampling: '4:2:0' })
				.toBuffer()
		);
	}

	/** The jimp format plugin (createJimp({ formats: [jpegFormat] })). */
	const jpegFormat = () => ({
		mime: /** @type {const} */ ('image/jpeg'),
		hasAlpha: true,
		encode,
		decode
	});
	return { jpegFormat, decode, encode };
}
