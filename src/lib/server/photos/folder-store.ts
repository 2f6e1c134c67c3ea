// The default photo store: files below one folder (UPLOAD_DIR).
import { mkdir, readFile, rm, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { PhotoStore } from './photo-store';
import { uploadDirProblem } from './upload-dir';

/** Absolute path of a stored file, refusing anything that would leave the upload directory. */
export function resolvePhotoPath(uploadDir: string, key: string): string {
	const root = path.resolve(uploadDir);
	const full = path.resolve(root, key);
	if (!full.startsWith(root + path.sep)) throw new Error('Photo path outside the upload folder.');
	return full;
}

export function folderPhotoStore(dir: string): PhotoStore {
	const root = path.resolve(dir);
	return {
		where: `folder ${root}`,
		async put(key, bytes) {
			const file = resolvePhotoPath(root, key);
			await mkdir(path.dirname(file), { recursive: true });
			// 'wx': never overwrite, even on the (absurd) chance of a repeated random key.
			await writeFile(file, bytes, { flag: 'wx' });
		},
		async get(key) {
			try {
				return await readFile(resolvePhotoPath(root, key));
			} catch (error) {
				if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
				throw error;
			}
		},
		async delete(key) {
			await rm(resolvePhotoPath(root, key), { force: true });
		},
		async problem() {
			return uploadDirProblem(root);
		}
	};
}
