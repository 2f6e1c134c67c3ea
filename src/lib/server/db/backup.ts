import { execFile } from 'node:child_process';
import fs from 'node:fs';
import { promisify } from 'node:util';
import SQLite from 'better-sqlite3';

const execFileAsync = promisify(execFile);

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

// ---------------------------------------------------------------- PostgreSQL

/** Runs one of PostgreSQL's client tools (Debian's postgresql-client); errors carry its words. */
async function runPgTool(tool: 'pg_dump' | 'pg_restore', args: string[], url?: string) {
	const env = { ...process.env };
	if (url) {
		// The password travels in PGPASSWORD, not on the command line where `ps` would show it.
		const u = new URL(url);
		if (u.password) env.PGPASSWORD = decodeURIComponent(u.password);
		u.password = '';
		args = [...args, `--dbname=${u.toString()}`];
	}
	try {
		return await execFileAsync(tool, args, { env, maxBuffer: 64 * 1024 * 1024 });
	} catch (error) {
		const e = error as NodeJS.ErrnoException & { stderr?: string };
		if (e.code === 'ENOENT') {
			throw new Error(`${tool} is not installed: apt-get install postgresql-client (Debian).`, {
				cause: error
			});
		}
		throw new Error(`${tool} failed: ${(e.stderr || e.message).trim()}`, { cause: error });
	}
}

/**
 * The tables whose rows a pg_dump custom-format file holds; throws when the file is not one.
 * Reading the archive's table of contents is pg_restore's own check, made before anything is
 * dropped.
 */
export async function listPostgresBackup(backupPath: string): Promise<string[]> {
	if (!fs.existsSync(backupPath)) throw new Error(`There is no backup at ${backupPath}.`);
	const { stdout } = await runPgTool('pg_restore', ['--list', backupPath]).catch((error) => {
		if (/not installed/.test((error as Error).message)) throw error;
		throw new Error(`${backupPath} is not a PostgreSQL backup (pg_dump --format=custom).`, {
			cause: error
		});
	});
	// Lines like `3456; 0 16390 TABLE DATA public dies castellan`.
	return [...stdout.matchAll(/^\d+; \d+ \d+ TABLE DATA (\S+) (\S+)/gm)].map((m) => m[2]);
}

/**
 * Backup of the PostgreSQL database at `url` with pg_dump's custom format: a consistent snapshot
 * (one repeatable-read transaction) taken while the app runs, restored with `restorePostgres`.
 */
export async function backupPostgres(
	url: string,
	targetPath: string
): Promise<{ tables: number; bytes: number }> {
	if (fs.existsSync(targetPath))
		throw new Error(`${targetPath} exists already; choose a new file.`);
	await runPgTool('pg_dump', ['--format=custom', '--no-owner', `--file=${targetPath}`], url);
	return {
		tables: (await listPostgresBackup(targetPath)).length,
		bytes: fs.statSync(targetPath).size
	};
}

/**
 * Replaces the contents of the PostgreSQL database at `url` with a backup. Stop the app first.
 * Castellan's tables are dropped and made again from the backup in one transaction: a restore
 * that fails part-way leaves the database as it was.
 */
export async function restorePostgres(
	backupPath: string,
	url: string
): Promise<{ tables: number }> {
	const tables = await listPostgresBackup(backupPath);
	await runPgTool(
		'pg_restore',
		['--clean', '--if-exists', '--no-owner', '--single-transaction', '--exit-on-error', backupPath],
		url
	);
	return { tables: tables.length };
}
