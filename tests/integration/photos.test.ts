import { createHash } from 'node:crypto';
import { crc32, deflateSync } from 'node:zlib';
import { createJimp } from '@jimp/core';
import jpeg from '@jimp/js-jpeg';
import png from '@jimp/js-png';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeShrink } from '../../src/lib/server/photos/image-core.js';
import {
	MAX_PHOTO_BYTES,
	PhotoError,
	processImage,
	type ProcessedImage
} from '../../src/lib/server/photos/process-image';
import {
	closePhotoPool,
	createPhotoPool,
	processImageInPool
} from '../../src/lib/server/photos/worker-pool';

const Jimp = createJimp({ formats: [jpeg, png] });

const RED = 0xff0000ff;
const BLUE = 0x0000ffff;

/** Smooth gradient: compresses like a photo and has no flat areas to hide resizing bugs. */
function gradient(width: number, height: number) {
	const data = Buffer.alloc(width * height * 4);
	for (let y = 0; y < height; y++) {
		for (let x = 0; x < width; x++) {
			const i = (y * width + x) * 4;
			data[i] = (x * 255) / width;
			data[i + 1] = (y * 255) / height;
			data[i + 2] = 128;
			data[i + 3] = 255;
		}
	}
	return new Jimp({ data, width, height });
}

/** Blue image with a red square in its top-left corner, to tell which way it was turned. */
async function markedJpeg(width: number, height: number): Promise<Buffer> {
	const image = new Jimp({ width, height, color: BLUE });
	for (let y = 0; y < height / 2; y++) {
		for (let x = 0; x < width / 3; x++) image.setPixelColor(RED, x, y);
	}
	return image.getBuffer('image/jpeg', { quality: 95 });
}

/** APP1 Exif segment (little-endian TIFF, one IFD0 entry: Orientation) right after SOI. */
function withExifOrientation(jpegBytes: Buffer, orientation: number): Buffer {
	const tiff = Buffer.alloc(26);
	tiff.write('II', 0, 'latin1');
	tiff.writeUInt16LE(42, 2);
	tiff.writeUInt32LE(8, 4); // IFD0 offset
	tiff.writeUInt16LE(1, 8); // one entry
	tiff.writeUInt16LE(0x0112, 10); // Orientation
	tiff.writeUInt16LE(3, 12); // SHORT
	tiff.writeUInt32LE(1, 14); // count
	tiff.writeUInt16LE(orientation, 18);
	tiff.writeUInt32LE(0, 22); // no next IFD
	const payload = Buffer.concat([Buffer.from('Exif\0\0', 'latin1'), tiff]);
	const header = Buffer.alloc(4);
	header.writeUInt16BE(0xffe1, 0);
	header.writeUInt16BE(payload.length + 2, 2);
	return Buffer.concat([jpegBytes.subarray(0, 2), header, payload, jpegBytes.subarray(2)]);
}

/** Marker segments before the first scan, with their payloads. */
function jpegSegments(bytes: Buffer): { marker: number; payload: Buffer }[] {
	const segments: { marker: number; payload: Buffer }[] = [];
	let offset = 2;
	while (offset + 4 <= bytes.length && bytes[offset] === 0xff) {
		const marker = bytes[offset + 1];
		const length = bytes.readUInt16BE(offset + 2);
		segments.push({ marker, payload: bytes.subarray(offset + 4, offset + 2 + length) });
		if (marker === 0xda) break;
		offset += 2 + length;
	}
	return segments;
}

function hasExif(bytes: Buffer): boolean {
	return jpegSegments(bytes).some(
		(segment) =>
			segment.marker === 0xe1 && segment.payload.subarray(0, 6).toString('latin1') === 'Exif\0\0'
	);
}

function pngChunk(type: string, data: Buffer): Buffer {
	const length = Buffer.alloc(4);
	length.writeUInt32BE(data.length);
	const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
	const crc = Buffer.alloc(4);
	crc.writeUInt32BE(crc32(body));
	return Buffer.concat([length, body, crc]);
}

/** A well-formed PNG of a few dozen bytes whose IHDR claims 20000 × 20000 px (400 MP). */
function pngBomb(): Buffer {
	const ihdr = Buffer.alloc(13);
	ihdr.writeUInt32BE(20_000, 0);
	ihdr.writeUInt32BE(20_000, 4);
	ihdr[8] = 8; // bit depth
	ihdr[9] = 6; // RGBA
	return Buffer.concat([
		Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
		pngChunk('IHDR', ihdr),
		pngChunk('IDAT', deflateSync(Buffer.alloc(1024))),
		pngChunk('IEND', Buffer.alloc(0))
	]);
}

/** A real, small JPEG with its frame header (SOF0) edited to claim 20000 × 20000 px. */
function jpegBomb(small: Buffer): Buffer {
	const bomb = Buffer.from(small);
	const sof = jpegSegments(bomb).find((segment) => segment.marker === 0xc0);
	if (!sof) throw new Error('fixture has no SOF0');
	const at = sof.payload.byteOffset - bomb.byteOffset;
	bomb.writeUInt16BE(20_000, at + 1);
	bomb.writeUInt16BE(20_000, at + 3);
	return bomb;
}

async function photoError(promise: Promise<unknown>): Promise<PhotoError> {
	const error = await promise.then(
		() => null,
		(reason: unknown) => reason
	);
	expect(error).toBeInstanceOf(PhotoError);
	return error as PhotoError;
}

function rgbAt(image: { getPixelColor(x: number, y: number): number }, x: number, y: number) {
	const color = image.getPixelColor(x, y);
	return { r: color >>> 24, g: (color >>> 16) & 0xff, b: (color >>> 8) & 0xff };
}

let largeJpeg: Buffer;
let smallJpeg: Buffer;

beforeAll(async () => {
	largeJpeg = await gradient(3000, 2000).getBuffer('image/jpeg', { quality: 90 });
	smallJpeg = await gradient(64, 48).getBuffer('image/jpeg', { quality: 90 });
});

afterAll(async () => {
	await closePhotoPool();
});

describe('processImage', () => {
	let large: ProcessedImage;

	beforeAll(async () => {
		large = await processImage(largeJpeg);
	});

	it('scales a 3000 × 2000 JPEG to a 2560 px full image and a 400 px thumbnail', async () => {
		expect(large).toMatchObject({
			width: 2560,
			height: 1707,
			originalWidth: 3000,
			originalHeight: 2000,
			sourceType: 'jpeg'
		});
		const full = await Jimp.fromBuffer(large.full);
		expect([full.width, full.height]).toEqual([2560, 1707]);
		const thumb = await Jimp.fromBuffer(large.thumb);
		expect([thumb.width, thumb.height]).toEqual([400, 267]);
		expect(large.sha256).toBe(createHash('sha256').update(large.full).digest('hex'));
	});

	it('keeps the picture: colours of the gradient survive resizing', async () => {
		const full = await Jimp.fromBuffer(large.full);
		// Gradient runs red 0→255 left to right and green 0→255 top to bottom.
		const topLeft = rgbAt(full, 5, 5);
		const bottomRight = rgbAt(full, 2554, 1701);
		expect(topLeft.r).toBeLessThan(20);
		expect(topLeft.g).toBeLessThan(20);
		expect(bottomRight.r).toBeGreaterThan(235);
		expect(bottomRight.g).toBeGreaterThan(235);
	});

	it('does not enlarge a small PNG, and flattens transparency onto white', async () => {
		const image = gradient(800, 600);
		for (let y = 0; y < 100; y++) for (let x = 0; x < 100; x++) image.setPixelColor(0, x, y);
		const result = await processImage(await image.getBuffer('image/png'));
		expect(result).toMatchObject({ width: 800, height: 600, sourceType: 'png' });
		const full = await Jimp.fromBuffer(result.full);
		expect([full.width, full.height]).toEqual([800, 600]);
		const corner = rgbAt(full, 50, 50);
		expect(Math.min(corner.r, corner.g, corner.b)).toBeGreaterThan(245);
		const thumb = await Jimp.fromBuffer(result.thumb);
		expect([thumb.width, thumb.height]).toEqual([400, 300]);
	});

	it('writes JPEGs that carry no EXIF', async () => {
		const tagged = withExifOrientation(largeJpeg, 1);
		expect(hasExif(tagged)).toBe(true);
		const result = await processImage(tagged);
		expect(result.full.subarray(0, 2)).toEqual(Buffer.from([0xff, 0xd8]));
		expect(hasExif(result.full)).toBe(false);
		expect(hasExif(result.thumb)).toBe(false);
	});

	// Where the red top-left corner must end up once the photo is shown upright.
	it.each([
		{ orientation: 6, size: [200, 300], red: [150, 50], blue: [50, 50] },
		{ orientation: 8, size: [200, 300], red: [50, 250], blue: [150, 250] },
		{ orientation: 3, size: [300, 200], red: [250, 150], blue: [50, 50] },
		{ orientation: 2, size: [300, 200], red: [250, 50], blue: [50, 50] }
	])('turns an EXIF orientation $orientation JPEG upright, exactly once', async (c) => {
		const input = withExifOrientation(await markedJpeg(300, 200), c.orientation);
		// The fixture is real EXIF: jimp's own reader sees it (and would rotate on read).
		const jimpView = await Jimp.fromBuffer(input);
		expect([jimpView.width, jimpView.height]).toEqual(c.size);

		const result = await processImage(input);
		expect([result.width, result.height]).toEqual(c.size);
		expect([result.originalWidth, result.originalHeight]).toEqual([300, 200]);
		expect(hasExif(result.full)).toBe(false);
		const full = await Jimp.fromBuffer(result.full);
		expect([full.width, full.height]).toEqual(c.size);
		const red = rgbAt(full, c.red[0], c.red[1]);
		const blue = rgbAt(full, c.blue[0], c.blue[1]);
		expect(red.r).toBeGreaterThan(200);
		expect(red.b).toBeLessThan(60);
		expect(blue.b).toBeGreaterThan(200);
		expect(blue.r).toBeLessThan(60);
	});

	it('decodes a 12 MP JPEG at half size in the DCT domain, turned upright, without EXIF', async () => {
		// 4000 × 3000, blue with a red block over the left third of the top half, EXIF 6 (the
		// phone held upright). By hand: 4000 / 2 = 2000 and 3000 / 2 = 1500 (≥ 1920 on the long
		// side, so half size is allowed; a quarter, 1000, is not); turned 90° clockwise that is
		// 1500 × 2000, and the red block (stored x < 1333, y < 1500) lands top right:
		// upright x ≥ 750, y < 667. Thumbnail: 400 / 2000 × 1500 = 300 by 400.
		const width = 4000;
		const height = 3000;
		const data = Buffer.alloc(width * height * 4);
		for (let y = 0; y < height; y++) {
			for (let x = 0; x < width; x++) {
				const i = (y * width + x) * 4;
				const red = x < width / 3 && y < height / 2;
				data[i] = red ? 255 : 0;
				data[i + 2] = red ? 0 : 255;
				data[i + 3] = 255;
			}
		}
		const stored = await new Jimp({ data, width, height }).getBuffer('image/jpeg', {
			quality: 90
		});
		const result = await processImage(withExifOrientation(stored, 6));
		expect([result.width, result.height]).toEqual([1500, 2000]);
		expect([result.originalWidth, result.originalHeight]).toEqual([4000, 3000]);
		expect(hasExif(result.full)).toBe(false);
		const full = await Jimp.fromBuffer(result.full);
		expect([full.width, full.height]).toEqual([1500, 2000]);
		const red = rgbAt(full, 1125, 333);
		const blue = rgbAt(full, 375, 333);
		expect(red.r).toBeGreaterThan(200);
		expect(red.b).toBeLessThan(60);
		expect(blue.b).toBeGreaterThan(200);
		expect(blue.r).toBeLessThan(60);
		const thumb = await Jimp.fromBuffer(result.thumb);
		expect([thumb.width, thumb.height]).toEqual([300, 400]);
	});

	it('picks the decode scale that keeps the long side at least 1920 px', () => {
		// By hand: ceil(long side / factor) must stay ≥ 1920; factors are 1, 2, 4, 8.
		expect(decodeShrink({ width: 3000, height: 2000 })).toBe(1); // 1500 < 1920
		expect(decodeShrink({ width: 3838, height: 2000 })).toBe(1); // 1919 < 1920
		expect(decodeShrink({ width: 3839, height: 2000 })).toBe(2); // ceil(1919.5) = 1920
		expect(decodeShrink({ width: 3000, height: 4000 })).toBe(2); // portrait: 2000
		expect(decodeShrink({ width: 8000, height: 5000 })).toBe(4); // 2000; an eighth is 1000
		expect(decodeShrink({ width: 2560, height: 1920 })).toBe(1); // a phone's downscaled photo
	});

	describe('refuses', () => {
		it('an empty file', async () => {
			const error = await photoError(processImage(Buffer.alloc(0)));
			expect(error.code).toBe('empty');
		});

		it('a text file named .jpg', async () => {
			const text = Buffer.from('Die 4711 inspection notes\nno cracks found\n');
			const error = await photoError(processImage(text));
			expect(error.code).toBe('not_image');
			expect(error.message).toMatch(/JPEG and PNG/);
		});

		it('a HEIC photo, saying what it is', async () => {
			const heic = Buffer.concat([
				Buffer.from([0, 0, 0, 24]),
				Buffer.from('ftypheic\0\0\0\0mif1heic', 'latin1')
			]);
			const error = await photoError(processImage(heic));
			expect(error.code).toBe('not_image');
			expect(error.message).toMatch(/HEIC/);
		});

		it('a truncated JPEG', async () => {
			const cut = largeJpeg.subarray(0, Math.floor(largeJpeg.length * 0.6));
			const error = await photoError(processImage(cut));
			expect(error.code).toBe('corrupt');
			expect(error.message).toMatch(/incomplete/);
		});

		it('a JPEG with damaged image data, and the decoder still works after it', async () => {
			const damaged = Buffer.from(largeJpeg);
			const scan = damaged.indexOf(Buffer.from([0xff, 0xda]));
			for (let i = scan + 200; i < damaged.length - 200; i += 997) damaged[i] ^= 0x55;
			const error = await photoError(processImage(damaged));
			expect(error.code).toBe('corrupt');
			expect(error.message).toMatch(/JPEG file is damaged/);
			expect((await processImage(smallJpeg)).sourceType).toBe('jpeg');
		});

		it('a JPEG cut off inside its headers', async () => {
			const error = await photoError(processImage(largeJpeg.subarray(0, 30)));
			expect(error.code).toBe('corrupt');
		});

		it('a truncated PNG', async () => {
			const whole = await gradient(200, 100).getBuffer('image/png');
			const error = await photoError(processImage(whole.subarray(0, whole.length - 100)));
			expect(error.code).toBe('corrupt');
		});

		it('a PNG whose pixel data fails its checksum', async () => {
			const damaged = await damagedPng();
			const error = await photoError(processImage(damaged));
			expect(error.code).toBe('corrupt');
			expect(error.message).toMatch(/damaged/);
		});

		it('a PNG decompression bomb, from its header alone', async () => {
			const bomb = pngBomb();
			expect(bomb.length).toBeLessThan(200);
			const error = await photoError(processImage(bomb));
			// 'corrupt' would mean the decoder ran; only the header check says this.
			expect(error.code).toBe('too_many_pixels');
			expect(error.message).toMatch(/20000 × 20000/);
		});

		it('a JPEG whose frame header claims 400 MP', async () => {
			const error = await photoError(processImage(jpegBomb(smallJpeg)));
			expect(error.code).toBe('too_many_pixels');
		});

		it('a file over 20 MiB, whatever it starts with', async () => {
			const huge = Buffer.alloc(MAX_PHOTO_BYTES + 1);
			huge.set([0xff, 0xd8, 0xff, 0xe0]);
			const error = await photoError(processImage(huge));
			expect(error.code).toBe('too_large');
		});
	});
});

/** A valid PNG with one byte of compressed pixel data flipped: the IDAT CRC no longer matches. */
async function damagedPng(): Promise<Buffer> {
	const bytes = Buffer.from(await gradient(200, 100).getBuffer('image/png'));
	const idat = bytes.indexOf('IDAT', 0, 'latin1');
	bytes[idat + 20] ^= 0xff;
	return bytes;
}

describe('processImageInPool', () => {
	it('gives the same result as processing in-thread, without blocking the event loop', async () => {
		const direct = await processImage(largeJpeg);

		let ticks = 0;
		const timer = setInterval(() => ticks++, 5);
		const pooled = await processImageInPool(largeJpeg);
		clearInterval(timer);

		expect(pooled.sha256).toBe(direct.sha256);
		expect(pooled.full.equals(direct.full)).toBe(true);
		expect(pooled.thumb.equals(direct.thumb)).toBe(true);
		expect(Buffer.isBuffer(pooled.full)).toBe(true);
		expect({ ...pooled, full: null, thumb: null }).toEqual({ ...direct, full: null, thumb: null });
		// The work runs on a worker thread, so this thread's timer keeps firing meanwhile. (With the
		// native codec a 6 MP photo takes well under a second, so only "it fired" is asserted.)
		expect(ticks).toBeGreaterThan(0);
	});

	it('rethrows the worker’s PhotoError with its code and message', async () => {
		// Passes the header checks done before queueing, so the worker's decoder finds it.
		const error = await photoError(processImageInPool(await damagedPng()));
		expect(error.code).toBe('corrupt');
		expect(error.message).toMatch(/PNG file is damaged/);
	});

	it('refuses a bad file before queueing it', async () => {
		const error = await photoError(processImageInPool(pngBomb()));
		expect(error.code).toBe('too_many_pixels');
	});

	it('queues jobs beyond its size and answers each with its own result', async () => {
		const pool = createPhotoPool(1);
		try {
			const inputs = [gradient(640, 480), gradient(480, 640), gradient(100, 100)];
			const buffers = await Promise.all(
				inputs.map((image) => image.getBuffer('image/jpeg', { quality: 80 }))
			);
			const results = await Promise.all(buffers.map((buffer) => pool.process(buffer)));
			expect(results.map((r) => [r.width, r.height])).toEqual([
				[640, 480],
				[480, 640],
				[100, 100]
			]);
		} finally {
			await pool.close();
		}
	});

	it('rejects queued jobs when closed', async () => {
		const pool = createPhotoPool(1);
		const outcomes = Promise.allSettled([pool.process(smallJpeg), pool.process(smallJpeg)]);
		await pool.close();
		for (const outcome of await outcomes) {
			expect(outcome.status).toBe('rejected');
			expect(String((outcome as PromiseRejectedResult).reason)).toMatch(/closed/);
		}
		await expect(pool.process(smallJpeg)).rejects.toThrow(/closed/);
	});
});
