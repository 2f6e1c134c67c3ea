import fs from 'node:fs';
import SQLite from 'better-sqlite3';

/**
 * Online backup of a live database with SQLite's backup API: pages are copied in steps while
 * other connections keep writing, and the copy is a consistent snapshot.
 */
export async function backupDatabase(
	sourcePath: string,
	targetPath: string
): Promise<{ pages: number }> {
	if (!fs.existsSync(sourcePath)) throw new Error(`There is no database at ${sourcePath}.`);
	if (fs.existsSync(targetPath))
		throw new Error(`${targetPath} exists already; choose a new file.`);
	const source = new SQLite(sourcePath, { fileMustExist: true });
	try {
		source.pragma('busy_timeout = 5000');
		const result = await source.backup(targetPath, { progress: () => 200 });
		return { pages: result.totalPages };
	} finally {
		source.close();
	}
}

/** Checks a database file with `PRAGMA integrity_check`; returns 'ok' or the problems found. */
export function checkIntegrity(path: string): string {
	const db = new SQLite(path, { readonly: true, fileMustExist: true });
	try {
		return (db.pragma('integrity_check') as { integrity_check: string }[])
			.map((r) => r.integrity_check)
			.join('; ');
	} finally {
		db.close();
	}
}

/**
 * Replaces the database at `targetPath` with a backup. The app must be stopped: the copy is
 * written to a side file, checked, and renamed over the target (WAL files removed).
 */
export function restoreDatabase(backupPath: string, targetPath: string) {
	const integrity = checkIntegrity(backupPath);
	if (integrity !== 'ok') throw new Error(`The backup fails its integrity check: ${integrity}`);
	const side = `${targetPath}.restoring`;
	fs.copyFileSync(backupPath, side);
	for (const suffix of ['-wal', '-shm']) fs.rmSync(targetPath + suffix, { force: true });
	fs.renameSync(side, targetPath);
}
