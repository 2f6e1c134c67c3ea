// The PostgreSQL side of the benches: when BENCH_DATABASE_URL names a PostgreSQL database, a bench
// builds its plant in a schema of its own there (migrated with the app's migrations), times the
// same server functions as on SQLite, and drops the schema afterwards.
import { sql } from 'kysely';
import type { BenchFigure } from './bench-report';
import {
	isPostgresUrl,
	migrateToLatest,
	openDatabase,
	type DB
} from '../../src/lib/server/db/connect';

/** The PostgreSQL database the benches also run against, or null when only SQLite is timed. */
export function benchDatabaseUrl(env: Record<string, string | undefined> = process.env) {
	const url = env.BENCH_DATABASE_URL?.trim();
	if (!url) return null;
	if (!isPostgresUrl(url)) {
		throw new Error(`BENCH_DATABASE_URL must be a postgres:// URL, not ${url}`);
	}
	return url;
}

/** `BENCH_SKIP_SQLITE=1` times PostgreSQL only (for working on the PostgreSQL side). */
export function skipSqlite(env: Record<string, string | undefined> = process.env) {
	return env.BENCH_SKIP_SQLITE === '1';
}

let schemas = 0;

export interface BenchSchema {
	db: DB;
	schema: string;
	/** Closes the pool and drops the schema with everything in it. */
	drop: () => Promise<void>;
}

/** A fresh schema in `url`, migrated to latest, opened with its own pool. */
export async function openBenchSchema(url: string, label: string): Promise<BenchSchema> {
	const schema = `bench_${label}_${process.pid}_${++schemas}`;
	const admin = openDatabase(url, { poolSize: 1 });
	try {
		await sql.raw(`create schema ${schema}`).execute(admin);
	} finally {
		await admin.destroy();
	}
	const db = openDatabase(url, { schema });
	const drop = async () => {
		await db.destroy();
		const again = openDatabase(url, { poolSize: 1 });
		try {
			await sql.raw(`drop schema if exists ${schema} cascade`).execute(again);
		} finally {
			await again.destroy();
		}
	};
	try {
		await migrateToLatest(db);
	} catch (err) {
		await drop();
		throw err;
	}
	return { db, schema, drop };
}

/**
 * VACUUM ANALYZE of every table in the bench schema after a bulk load: what autovacuum does to a
 * database that has been running a while (planner statistics, visibility map for index-only scans),
 * done at once so the timings do not race it.
 */
export async function settleAfterBulkLoad(db: DB) {
	const tables = await sql<{ name: string }>`
		select table_name as name from information_schema.tables
		 where table_schema = current_schema() and table_type = 'BASE TABLE'`.execute(db);
	const list = tables.rows.map((t) => `"${t.name}"`).join(', ');
	if (list) await sql.raw(`vacuum analyze ${list}`).execute(db);
}

/**
 * The PostgreSQL side of a bench could not run (a writer or query not yet portable, the database
 * unreachable): says why, and gives the failed figure that keeps the SQLite figures printed.
 */
export function postgresFailed(what: string, err: unknown): BenchFigure {
	console.log(
		`  ${what} on PostgreSQL failed: ${err instanceof Error ? err.message : String(err)}`
	);
	return { figure: `${what}, PostgreSQL`, value: NaN, unit: '', target: 'runs', pass: false };
}
