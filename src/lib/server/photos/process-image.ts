import { createJimp } from '@jimp/core';
import png from '@jimp/js-png';
import { methods as resizeMethods } from '@jimp/plugin-resize';
import { loadWasmJpeg } from './jpeg-codec.js';
import { createImageProcessor } from './image-core.js';
import type { ProcessedImage } from './image-core.js';

export {
	FULL_LONG_SIDE,
	MAX_PHOTO_BYTES,
	MAX_PHOTO_PIXELS,
	PhotoError,
	THUMB_LONG_SIDE,
	inspectImage
} from './image-core.js';
export type { ImageHeader, PhotoErrorCode, ProcessedImage } from './image-core.js';

let processInThisThread: Promise<ReturnType<typeof createImageProcessor>> | undefined;

/** Compiles the WebAssembly JPEG codec on first use (photo workers compile their own). */
function getProcessor() {
	processInThisThread ??= loadWasmJpeg(import.meta.resolve('wasm-vips')).then((jpeg) =>
		createImageProcessor({ createJimp, jpeg, png, resizeMethods })
	);
	return processInThisThread;
}

/**
 * Checks an uploaded photo by content (JPEG or PNG, ≤ 20 MiB, ≤ 40 MP declared in the header,
 * complete), turns it upright per EXIF, and re-encodes it as a full-size JPEG (long side
 * ≤ 2560 px) and a thumbnail (≤ 400 px), both without metadata. Throws PhotoError for a file
 * the uploader has to fix.
 *
 * Runs on the calling thread, where the pixel work (decoding, resizing, encoding) blocks it:
 * request handlers use processImageInPool from worker-pool.ts instead.
 */
export async function processImage(buffer: Buffer | Uint8Array): Promise<ProcessedImage> {
	const process = await getProcessor();
	return process(buffer);
}
