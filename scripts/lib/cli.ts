import fs from 'node:fs';
import path from 'node:path';
import { parseArgs, type ParseArgsConfig } from 'node:util';
import {
	databaseTarget,
	isPostgresUrl,
	migrateToLatest,
	openDatabase,
	type DB
} from '../../src/lib/server/db/connect';

/** Exit code for bad command-line arguments. */
export const BAD_ARGUMENTS = 2;

export function fail(message: string, usage?: string): never {
	console.error(`Error: ${message}`);
	if (usage) console.error(`Usage: ${usage}`);
	process.exit(BAD_ARGUMENTS);
}

export function parseCli<T extends ParseArgsConfig['options']>(options: T, usage: string) {
	try {
		return parseArgs({ options, allowPositionals: true, strict: true });
	} catch (err) {
		fail((err as Error).message, usage);
	}
}

export function databasePath(): string {
	return process.env.DATABASE_PATH || './data/castellan.db';
}

/** The database as shown to people: the SQLite path, or the PostgreSQL URL without its password. */
export function shownTarget(target = databaseTarget(process.env)): string {
	return target.replace(/\/\/([^:@/]*):[^@/]*@/, '//$1@');
}

/**
 * Opens the command's database and migrates it: PostgreSQL when DATABASE_URL is set, else the
 * SQLite file at DATABASE_PATH (making the default ./data folder if needed).
 */
export async function openMigratedDatabase(): Promise<DB> {
	const target = databaseTarget(process.env);
	if (!isPostgresUrl(target) && !process.env.DATABASE_PATH) {
		fs.mkdirSync(path.dirname(target), { recursive: true });
	}
	const db = openDatabase(target);
	await migrateToLatest(db);
	return db;
}
