import { env } from '$env/dynamic/private';
import { databaseTarget, openDatabase, type DB } from './connect';

export type { DB } from './connect';

let instance: DB | undefined;

/**
 * The app's one Kysely instance, opened on first use so `vite build` never touches the database:
 * PostgreSQL when `DATABASE_URL` is set, else the SQLite file at `DATABASE_PATH`.
 */
export function getDb(): DB {
	instance ??= openDatabase(databaseTarget(env));
	return instance;
}

/** Closes the database (the server shutting down): the pool's connections or the SQLite file. */
export async function closeDb(): Promise<void> {
	const open = instance;
	instance = undefined;
	await open?.destroy();
}
