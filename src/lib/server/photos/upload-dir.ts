import fs from 'node:fs';
import path from 'node:path';

/**
 * Why photos cannot be stored in `dir` (a sentence for the log), or null when a file can be
 * written there. Creates the folder when it is missing and writes and removes a probe file, so a
 * read-only mount or a wrong owner shows up before anyone uploads.
 */
export function uploadDirProblem(dir: string): string | null {
	try {
		fs.mkdirSync(dir, { recursive: true });
		const probe = path.join(dir, `.write-check-${process.pid}-${Date.now()}`);
		fs.writeFileSync(probe, '');
		fs.rmSync(probe);
		return null;
	} catch (err) {
		const code = (err as NodeJS.ErrnoException).code ?? 'error';
		return `The photo folder ${dir} cannot be written (${code}). Set UPLOAD_DIR to a folder the server may write, or fix its owner and permissions.`;
	}
}

/** The sentence a refused upload gets while the photo store cannot be written. */
export const UPLOADS_UNAVAILABLE =
	'Photos cannot be stored right now: the server’s photo store cannot be written. Nothing was saved; tell the plant admin.';
