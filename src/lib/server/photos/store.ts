/**
 * Photo files: checking a batch of uploads before anything is kept, and writing the processed
 * JPEGs under random names into the photo store (photo-store.ts: a folder or an S3 bucket). Database rows are the caller's (toolroom/photos.ts): it writes the
 * files first, then the rows in one transaction, and removes the files if that transaction fails,
 * so an upload is stored whole or not at all.
 */
import { randomBytes } from 'node:crypto';
import { MAX_PHOTO_BYTES, PhotoError } from './process-image';
import type { ProcessedImage } from './process-image';
import type { PhotoStore } from './photo-store';
import { processImageInPool } from './worker-pool';

/** A file as a multipart form hands it over (File / Blob), or a test builds it. */
export interface UploadedFile {
	name: string;
	size: number;
	arrayBuffer(): Promise<ArrayBuffer>;
}

export interface PhotoProblem {
	/** The uploader's file name, only ever shown back to them. */
	file: string;
	message: string;
}

export type PreparedPhotos =
	{ ok: true; images: ProcessedImage[] } | { ok: false; message: string; problems: PhotoProblem[] };

export interface StoredPhotoFiles {
	/** Keys in the photo store (relative paths below UPLOAD_DIR for the folder store). */
	fullFile: string;
	thumbFile: string;
	image: ProcessedImage;
}

function formatMiB(bytes: number): string {
	return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

/** Drops the empty part a browser sends for a file input nobody filled in. */
export function selectedFiles(values: unknown[]): UploadedFile[] {
	return values.filter(
		(v): v is UploadedFile =>
			typeof v === 'object' &&
			v !== null &&
			typeof (v as UploadedFile).arrayBuffer === 'function' &&
			!((v as UploadedFile).size === 0 && !(v as UploadedFile).name)
	);
}

export type CheckedPhotos =
	| { ok: true; images: { file: string; image: ProcessedImage }[]; problems: PhotoProblem[] }
	| { ok: false; message: string; problems: PhotoProblem[] };

/**
 * Checks and processes every file of one upload on the photo worker pool, each on its own: the
 * good ones come back processed, each bad one as a problem with the uploader's file name.
 * Refuses the batch as such only when it is empty or has too many files.
 */
export async function checkPhotos(files: UploadedFile[], maxFiles: number): Promise<CheckedPhotos> {
	if (files.length === 0) {
		return { ok: false, message: 'Choose at least one photo.', problems: [] };
	}
	if (files.length > maxFiles) {
		return {
			ok: false,
			message: `You sent ${files.length} photos; send at most ${maxFiles} at a time.`,
			problems: []
		};
	}
	const results = await Promise.allSettled(
		files.map(async (file) => {
			// Refused on the declared size before the bytes are even copied.
			if (file.size > MAX_PHOTO_BYTES) {
				throw new PhotoError(
					'too_large',
					`The file is ${formatMiB(file.size)}; photos may be at most ${formatMiB(MAX_PHOTO_BYTES)}.`
				);
			}
			return processImageInPool(new Uint8Array(await file.arrayBuffer()));
		})
	);
	const problems: PhotoProblem[] = [];
	const images: { file: string; image: ProcessedImage }[] = [];
	results.forEach((result, i) => {
		const file = files[i].name || `Photo ${i + 1}`;
		if (result.status === 'fulfilled') {
			images.push({ file, image: result.value });
		} else if (result.reason instanceof PhotoError) {
			problems.push({ file, message: result.reason.message });
		} else {
			// A worker failure (out of memory, crash) is ours, not the uploader's; the pool replaces
			// the worker and the server carries on.
			console.error('Photo processing failed', result.reason);
			problems.push({ file, message: 'This photo could not be processed. Try it again.' });
		}
	});
	return { ok: true, images, problems };
}

/**
 * All-or-nothing variant for a record that is saved with its photos (a surface inspection):
 * one bad file refuses the whole upload (each bad file named with its reason), so the record
 * is not saved half way and the uploader can fix the batch and send it again.
 */
export async function preparePhotos(
	files: UploadedFile[],
	maxFiles: number
): Promise<PreparedPhotos> {
	const checked = await checkPhotos(files, maxFiles);
	if (!checked.ok) return checked;
	const { problems } = checked;
	if (problems.length > 0) {
		const n = problems.length;
		return {
			ok: false,
			message:
				files.length === 1
					? 'The photo was not saved.'
					: `${n} of ${files.length} photos cannot be used, so none were saved. Remove or replace ${n === 1 ? 'it' : 'them'} and upload again.`,
			problems
		};
	}
	return { ok: true, images: checked.images.map((i) => i.image) };
}

/** Writes full-size and thumbnail JPEGs under fresh random names; all or none. */
export async function writePhotoFiles(
	store: PhotoStore,
	images: ProcessedImage[]
): Promise<StoredPhotoFiles[]> {
	const written: StoredPhotoFiles[] = [];
	try {
		for (const image of images) {
			const key = randomBytes(16).toString('hex');
			// Two-character folders keep any one directory small; keys use '/' on every system.
			const dir = `photos/${key.slice(0, 2)}`;
			const stored = {
				fullFile: `${dir}/${key}.jpg`,
				thumbFile: `${dir}/${key}.thumb.jpg`,
				image
			};
			written.push(stored);
			await store.put(stored.fullFile, image.full);
			await store.put(stored.thumbFile, image.thumb);
		}
	} catch (error) {
		await removePhotoFiles(store, written);
		throw error;
	}
	return written;
}

/** Removes stored files (missing ones are fine): the undo of writePhotoFiles. */
export async function removePhotoFiles(
	store: PhotoStore,
	files: { fullFile: string; thumbFile: string }[]
): Promise<void> {
	await Promise.all(files.flatMap((f) => [store.delete(f.fullFile), store.delete(f.thumbFile)]));
}

/**
 * Writes the files, then runs `save` (which inserts the rows in one transaction); when `save`
 * throws, the files go again, so a failed upload leaves neither rows nor files.
 */
export async function storePhotoFilesWith<T>(
	store: PhotoStore,
	images: ProcessedImage[],
	save: (files: StoredPhotoFiles[]) => Promise<T>
): Promise<T> {
	const files = await writePhotoFiles(store, images);
	try {
		return await save(files);
	} catch (error) {
		await removePhotoFiles(store, files).catch((cleanup) =>
			console.error('Photo files of a failed save could not be removed', cleanup)
		);
		throw error;
	}
}
