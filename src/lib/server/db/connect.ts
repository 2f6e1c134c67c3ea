import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import SQLite from 'better-sqlite3';
import pg from 'pg';
import {
	Kysely,
	Migrator,
	PostgresDialect,
	SqliteDialect,
	sql,
	type MigrationProvider
} from 'kysely';
import { migrations } from '../../../../migrations/index';
import type { Database } from './schema';

export type DB = Kysely<Database>;

/** The two engines Castellan runs on: one SQLite file (the default) or a PostgreSQL database. */
export type Engine = 'sqlite' | 'postgres';

const rawHandles = new WeakMap<object, SQLite.Database>();
const engines = new WeakMap<object, Engine>();
const pools = new WeakMap<object, pg.Pool>();
const schemas = new WeakMap<object, string>();
const opened = new WeakMap<object, { target: string; options: OpenOptions }>();

/**
 * The better-sqlite3 handle under a Kysely instance opened on SQLite. Code that must run on both
 * engines uses `db/session.ts` instead; this is left for SQLite-only tools (the file backup, the
 * benches' raw reference writers).
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function rawHandle(db: Kysely<any>): SQLite.Database {
	const handle = rawHandles.get(db);
	if (!handle) {
		throw new Error(
			engines.get(db) === 'postgres'
				? 'This is a PostgreSQL database; the SQLite handle exists only on SQLite.'
				: 'This Kysely instance was not opened with openDatabase().'
		);
	}
	return handle;
}

/** Which engine a Kysely instance (or a transaction / connection from it) talks to. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function engineOf(db: Kysely<any>): Engine {
	const known = engines.get(db);
	if (known) return known;
	// A transaction or a single connection is a new Kysely object; ask its adapter.
	const adapter = db.getExecutor().adapter;
	return adapter.constructor.name.toLowerCase().includes('postgres') ? 'postgres' : 'sqlite';
}

/** The pg pool under a Kysely instance opened on PostgreSQL (for pg_dump-free maintenance). */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function poolOf(db: Kysely<any>): pg.Pool | undefined {
	return pools.get(db);
}

/** True for `postgres://…` / `postgresql://…`; anything else is a SQLite file path. */
export function isPostgresUrl(target: string): boolean {
	return /^postgres(ql)?:\/\//i.test(target.trim());
}

// PostgreSQL answers count(*), sum(integer) as bigint and avg/sum(bigint) as numeric, which the
// pg driver hands over as text; Castellan's counts stay far below 2^53, so read them as numbers
// (the same numbers SQLite returns).
pg.types.setTypeParser(20, (v) => Number(v));
pg.types.setTypeParser(1700, (v) => Number(v));

export interface OpenOptions {
	/** PostgreSQL pool size (connections per app process); `DATABASE_POOL_SIZE`, default 10. */
	poolSize?: number;
	/** PostgreSQL schema to use instead of `public` (the test suite gives each file its own). */
	schema?: string;
}

/**
 * Opens the database with the settings every Castellan process uses: a PostgreSQL URL selects
 * Kysely's PostgreSQL dialect over a `pg` pool; anything else is the SQLite file's path. Kept free
 * of SvelteKit's `$env` so scripts and tests can open a database of their own.
 */
export function openDatabase(target: string, options: OpenOptions = {}): DB {
	const db = isPostgresUrl(target) ? openPostgres(target, options) : openSqlite(target);
	opened.set(db, { target, options });
	return db;
}

function openSqlite(target: string): DB {
	const filename = target;
	if (filename !== ':memory:') {
		const dir = path.dirname(path.resolve(filename));
		if (!fs.existsSync(dir)) {
			throw new Error(
				`The folder for the database does not exist: ${dir}. Create it or set DATABASE_PATH.`
			);
		}
	}
	const sqlite = new SQLite(filename);
	sqlite.pragma('journal_mode = WAL');
	sqlite.pragma('foreign_keys = ON');
	sqlite.pragma('busy_timeout = 5000');
	sqlite.pragma('synchronous = NORMAL');
	// Checkpoint every ~32 MB of WAL instead of ~4 MB: a press feed commits many small batches, and
	// frequent checkpoints rewrote the same index pages over and over (ingest rate +25 % in the bench).
	sqlite.pragma('wal_autocheckpoint = 8000');
	const db = new Kysely<Database>({ dialect: new SqliteDialect({ database: sqlite }) });
	rawHandles.set(db, sqlite);
	engines.set(db, 'sqlite');
	return db;
}

function openPostgres(url: string, options: OpenOptions): DB {
	const size = options.poolSize ?? Number(process.env.DATABASE_POOL_SIZE || 10);
	if (!Number.isInteger(size) || size < 1) {
		throw new Error(`DATABASE_POOL_SIZE must be a whole number of 1 or more, not ${size}.`);
	}
	if (options.schema !== undefined && !/^[a-z_][a-z0-9_]{0,62}$/.test(options.schema)) {
		throw new Error(`Not a plain schema name: ${options.schema}`);
	}
	const pool = new pg.Pool({
		connectionString: url,
		max: size,
		// Every connection works in the plant's schema and stores times as text in UTC anyway.
		options: options.schema ? `-c search_path=${options.schema}` : undefined
	});
	const db = new Kysely<Database>({ dialect: new PostgresDialect({ pool }) });
	engines.set(db, 'postgres');
	pools.set(db, pool);
	if (options.schema) schemas.set(db, options.schema);
	return db;
}

/** The database target of this process: `DATABASE_URL` (PostgreSQL) or `DATABASE_PATH` (SQLite). */
export function databaseTarget(env: Record<string, string | undefined> = process.env): string {
	return env.DATABASE_URL?.trim() || env.DATABASE_PATH || './data/castellan.db';
}

const provider: MigrationProvider = { getMigrations: async () => migrations };

/** Runs every pending migration; throws with the failing migration's name. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function migrateToLatest(db: Kysely<any>): Promise<string[]> {
	// On PostgreSQL name the schema: Kysely looks for its bookkeeping tables by name across every
	// schema it can see, and would take another schema's for this one's. A URL may choose the
	// schema itself (`options=-c search_path=…`, see databaseEnvFor), so ask when it is not known.
	const migrationTableSchema =
		engineOf(db) === 'postgres'
			? (schemas.get(db) ??
				(await sql<{ schema: string }>`select current_schema() as schema`.execute(db)).rows[0]
					.schema)
			: undefined;
	const migrator = new Migrator({ db, provider, migrationTableSchema });
	const { error, results } = await migrator.migrateToLatest();
	if (error) {
		const failed = results?.find((r) => r.status === 'Error')?.migrationName ?? 'unknown';
		throw new Error(`Migration ${failed} failed: ${String((error as Error)?.message ?? error)}`);
	}
	return (results ?? []).map((r) => r.migrationName);
}

/**
 * The engine the integration suite runs on: SQLite in memory by default; PostgreSQL when the
 * suite's PostgreSQL pass sets `CASTELLAN_TEST_ENGINE=postgres` beside `TEST_DATABASE_URL`.
 */
export function testEngine(): Engine {
	return process.env.CASTELLAN_TEST_ENGINE === 'postgres' ? 'postgres' : 'sqlite';
}

let testDatabases = 0;

function testDatabaseUrl(): string {
	const url = process.env.TEST_DATABASE_URL;
	if (!url) throw new Error('CASTELLAN_TEST_ENGINE=postgres needs TEST_DATABASE_URL.');
	return url;
}

/** The same server and credentials as `url`, another database. */
function withDatabase(url: string, name: string): string {
	const u = new URL(url);
	u.pathname = `/${name}`;
	return u.toString();
}

/**
 * The migrated template every PostgreSQL test database is copied from, made once per run of the
 * suite (whichever test worker gets there first, under an advisory lock) and named after the
 * migrations it holds, so a new migration makes a new template. Copying a template takes a
 * fraction of the time migrating takes, and a database per test keeps each test's catalog small
 * (Kysely's migrator reads every table it can see).
 */
async function testTemplate(admin: DB): Promise<string> {
	const names = Object.keys(migrations).sort();
	let hash = 0;
	for (const ch of names.join('|')) hash = (hash * 31 + ch.charCodeAt(0)) >>> 0;
	const name = `tdb_template_${names.length}_${hash}`;
	await sql`select pg_advisory_lock(${0x43419999})`.execute(admin);
	try {
		const found = await sql`select 1 from pg_database where datname = ${name}`.execute(admin);
		if (found.rows.length === 0) {
			await sql.raw(`create database ${name}_wip`).execute(admin);
			const wip = openDatabase(withDatabase(testDatabaseUrl(), `${name}_wip`), { poolSize: 1 });
			try {
				await migrateToLatest(wip);
			} finally {
				await wip.destroy();
			}
			await sql.raw(`alter database ${name}_wip rename to ${name}`).execute(admin);
		}
	} finally {
		await sql`select pg_advisory_unlock(${0x43419999})`.execute(admin);
	}
	return name;
}

/**
 * A new database beside `TEST_DATABASE_URL`'s for one test, migrated (a copy of the template) or
 * empty; its URL. Never dropped here: `npm run test:pg` drops them after the run.
 */
async function createTestDatabase(migrated: boolean): Promise<string> {
	const admin = openDatabase(testDatabaseUrl(), { poolSize: 1 });
	try {
		const name = `tdb_test_${process.pid}_${Date.now().toString(36)}_${++testDatabases}`;
		const from = migrated ? await testTemplate(admin) : 'template0';
		await sql.raw(`create database ${name} template ${from} strategy file_copy`).execute(admin);
		return withDatabase(testDatabaseUrl(), name);
	} finally {
		await admin.destroy();
	}
}

/**
 * A fresh, empty database for a test that opens it the way the app does (`DATABASE_URL` /
 * `DATABASE_PATH`, a child process) and migrates it itself: the given SQLite file, or on the
 * PostgreSQL pass the URL of a new database of its own.
 */
export async function newTestDatabaseTarget(sqliteFile: string): Promise<string> {
	if (testEngine() === 'sqlite') return sqliteFile;
	return createTestDatabase(false);
}

/**
 * A migrated, empty database for one test: SQLite in memory, or on the PostgreSQL pass a database
 * of its own beside `TEST_DATABASE_URL`'s. `migrate: false` leaves it empty (tests of the
 * migrations).
 */
export async function openTestDatabase(options: { migrate?: boolean } = {}): Promise<DB> {
	const migrate = options.migrate !== false;
	if (testEngine() === 'postgres') {
		return openDatabase(await createTestDatabase(migrate), { poolSize: 4 });
	}
	const db = openDatabase(':memory:');
	if (migrate) await migrateToLatest(db);
	return db;
}

const sharedFiles: string[] = [];

/**
 * Like `openTestDatabase`, but one that `reopenDatabase` and child processes (`databaseEnvFor`)
 * can open too, as several app processes would: on SQLite a migrated file in a temporary folder
 * (removed when the test process exits) instead of memory; on PostgreSQL a schema of its own.
 */
export async function openSharedTestDatabase(): Promise<DB> {
	if (testEngine() === 'postgres') return openTestDatabase();
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-test-'));
	if (sharedFiles.push(dir) === 1) {
		process.once('exit', () => {
			for (const d of sharedFiles) fs.rmSync(d, { recursive: true, force: true });
		});
	}
	const db = openDatabase(path.join(dir, 'plant.db'));
	await migrateToLatest(db);
	return db;
}

function openedWith(db: DB): { target: string; options: OpenOptions } {
	const known = opened.get(db);
	if (!known) throw new Error('This Kysely instance was not opened with openDatabase().');
	if (known.target === ':memory:') {
		throw new Error('An in-memory SQLite database cannot be opened a second time.');
	}
	return known;
}

/**
 * A second, independent Kysely instance (its own SQLite handle or its own pg pool) on the same
 * database as `db`, as a second app process would open it: for tests of two writers at once.
 */
export function reopenDatabase(db: DB): DB {
	const { target, options } = openedWith(db);
	return openDatabase(target, options);
}

/**
 * The environment a child process (`node build`, a script) needs to open the same database as
 * `db`: `DATABASE_PATH`, or on PostgreSQL `DATABASE_URL` with the schema in its `options`.
 */
export function databaseEnvFor(db: DB): { DATABASE_PATH: string } | { DATABASE_URL: string } {
	const { target, options } = openedWith(db);
	if (!isPostgresUrl(target)) return { DATABASE_PATH: target };
	if (!options.schema) return { DATABASE_URL: target };
	const url = new URL(target);
	url.searchParams.set('options', `-c search_path=${options.schema}`);
	return { DATABASE_URL: url.toString() };
}
