import { env } from '$env/dynamic/private';
import { openDatabase, type DB } from './connect';

export type { DB } from './connect';

let instance: DB | undefined;

/** The app's one Kysely instance, opened on first use so `vite build` never touches the file. */
export function getDb(): DB {
	instance ??= openDatabase(env.DATABASE_PATH || './data/castellan.db');
	return instance;
}
