import { sql, type Kysely } from 'kysely';
import { onPostgres } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Session expiry and the sign-in throttle's window start are Unix times in milliseconds
// (1.8 × 10^12 today). SQLite's integer holds 8 bytes, PostgreSQL's `integer` only 4, so there
// they become `bigint`. Nothing changes on SQLite.

const COLUMNS: [table: string, column: string][] = [
	['sessions', 'expires_at'],
	['sign_in_failures', 'window_started_at']
];

export async function up(db: Kysely<any>): Promise<void> {
	if (!onPostgres(db)) return;
	for (const [table, column] of COLUMNS) {
		await sql.raw(`alter table ${table} alter column ${column} type bigint`).execute(db);
	}
}

export async function down(db: Kysely<any>): Promise<void> {
	if (!onPostgres(db)) return;
	for (const [table, column] of COLUMNS) {
		await sql.raw(`alter table ${table} alter column ${column} type integer`).execute(db);
	}
}
