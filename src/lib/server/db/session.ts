/**
 * Portable raw SQL for the hot paths (the shot ledger, imports, the sign-in throttle, the notice
 * outbox): the same statements, written once with `?` placeholders, run on SQLite through cached
 * better-sqlite3 prepared statements and on PostgreSQL through the pooled connection Kysely holds.
 *
 * `inWriteTransaction` is the one way such code writes: SQLite takes the write lock up front
 * (`BEGIN IMMEDIATE`, one writer at a time, as before); PostgreSQL runs READ COMMITTED and takes a
 * transaction-level advisory lock named by the caller, so two app processes writing the same
 * ledger queue exactly as two requests in one process do. Every statement inside the callback
 * must go through the session (or `session.kysely`), never through the outer `db`: the connection
 * is held for the whole transaction.
 *
 * SQL written here must mean the same on both engines: `on conflict … do nothing/update` rather
 * than `insert or ignore`, `case` rather than two-argument `max()`, `lower(a) = lower(?)` rather
 * than `collate nocase`, `in (…)` lists rather than `json_each`.
 */
import type SQLite from 'better-sqlite3';
import { CompiledQuery, type Kysely } from 'kysely';
import { engineOf, rawHandle, type DB, type Engine } from './connect';

export interface RunResult {
	/** Rows inserted, changed or deleted. */
	changes: number;
}

export interface SqlSession {
	readonly engine: Engine;
	/** The connection the session holds, for Kysely-built queries inside the same transaction. */
	readonly kysely: DB;
	get<T>(text: string, params?: readonly unknown[]): Promise<T | undefined>;
	all<T>(text: string, params?: readonly unknown[]): Promise<T[]>;
	run(text: string, params?: readonly unknown[]): Promise<RunResult>;
}

/** The names of the advisory locks; one per kind of work that must not interleave. */
export type WriteLock = 'ledger' | 'import' | 'throttle' | 'notices' | 'registry';

const LOCK_IDS: Record<WriteLock, number> = {
	// Arbitrary, fixed numbers in Castellan's own range; only their distinctness matters.
	ledger: 0x43410001,
	import: 0x43410002,
	throttle: 0x43410003,
	notices: 0x43410004,
	registry: 0x43410005
};

/** The advisory lock number, for code that takes a session-level lock (the notice job). */
export function advisoryLockId(lock: WriteLock): number {
	return LOCK_IDS[lock];
}

// ---------------------------------------------------------------- SQLite

const statementCaches = new WeakMap<SQLite.Database, Map<string, SQLite.Statement>>();

function sqliteStatement(raw: SQLite.Database, text: string): SQLite.Statement {
	let cache = statementCaches.get(raw);
	if (!cache) statementCaches.set(raw, (cache = new Map()));
	let st = cache.get(text);
	if (!st) {
		st = raw.prepare(text);
		cache.set(text, st);
	}
	return st;
}

/**
 * A session over a better-sqlite3 handle already inside a transaction the caller began (code not
 * yet on `inWriteTransaction`, such as the SQLite-only import commit on its own connection).
 */
export function sqliteSession(raw: SQLite.Database, kysely: DB): SqlSession {
	return {
		engine: 'sqlite',
		kysely,
		async get<T>(text: string, params: readonly unknown[] = []) {
			return sqliteStatement(raw, text).get(...params) as T | undefined;
		},
		async all<T>(text: string, params: readonly unknown[] = []) {
			return sqliteStatement(raw, text).all(...params) as T[];
		},
		async run(text: string, params: readonly unknown[] = []) {
			return { changes: sqliteStatement(raw, text).run(...params).changes };
		}
	};
}

/** How long a writer waits for SQLite's write lock before giving up (the busy_timeout it replaces). */
const SQLITE_LOCK_WAIT_MS = 5000;

/**
 * `BEGIN IMMEDIATE` that waits for the write lock without blocking the event loop. The work
 * inside a transaction awaits between statements, so when another handle in this same process
 * holds the lock (tests of two writers, a script beside the server), better-sqlite3's busy wait
 * would stall the very process that must finish that transaction until the timeout. Instead the
 * lock is tried at once and tried again after a short sleep, up to the usual five seconds.
 */
async function beginImmediate(raw: SQLite.Database): Promise<void> {
	const give = Date.now() + SQLITE_LOCK_WAIT_MS;
	for (let pause = 1; ; pause = Math.min(pause * 2, 25)) {
		raw.pragma('busy_timeout = 0');
		try {
			sqliteStatement(raw, 'begin immediate').run();
			return;
		} catch (error) {
			if ((error as { code?: string }).code !== 'SQLITE_BUSY' || Date.now() > give) throw error;
		} finally {
			raw.pragma(`busy_timeout = ${SQLITE_LOCK_WAIT_MS}`);
		}
		await new Promise((resolve) => setTimeout(resolve, pause));
	}
}

// ---------------------------------------------------------------- PostgreSQL

const placeholderCache = new Map<string, string>();

/** `?` → `$1, $2…`, leaving question marks inside quoted strings and identifiers alone. */
export function numberPlaceholders(text: string): string {
	const cached = placeholderCache.get(text);
	if (cached !== undefined) return cached;
	let out = '';
	let n = 0;
	let quote: string | null = null;
	for (const ch of text) {
		if (quote) {
			if (ch === quote) quote = null;
			out += ch;
		} else if (ch === "'" || ch === '"') {
			quote = ch;
			out += ch;
		} else if (ch === '?') {
			out += `$${++n}`;
		} else {
			out += ch;
		}
	}
	if (placeholderCache.size < 2000) placeholderCache.set(text, out);
	return out;
}

function postgresSession(conn: DB): SqlSession {
	const query = async <T>(text: string, params: readonly unknown[]) =>
		conn.executeQuery<T>(CompiledQuery.raw(numberPlaceholders(text), [...params]));
	return {
		engine: 'postgres',
		kysely: conn,
		async get<T>(text: string, params: readonly unknown[] = []) {
			return (await query<T>(text, params)).rows[0];
		},
		async all<T>(text: string, params: readonly unknown[] = []) {
			return (await query<T>(text, params)).rows;
		},
		async run(text: string, params: readonly unknown[] = []) {
			const result = await query(text, params);
			return { changes: Number(result.numAffectedRows ?? 0n) };
		}
	};
}

// ---------------------------------------------------------------- transactions

export interface WriteOptions {
	/** The advisory lock PostgreSQL takes (SQLite's IMMEDIATE lock covers everything). */
	lock: WriteLock;
	/** Run everything, then roll back (a dry run answers as a real run would, writing nothing). */
	rollback?: boolean;
}

/**
 * Runs `work` in one transaction that holds the write lock from its first statement: all of it
 * is written or none of it. Errors roll back and are thrown on.
 */
export async function inWriteTransaction<T>(
	db: DB,
	options: WriteOptions,
	work: (session: SqlSession) => Promise<T>
): Promise<T> {
	if (engineOf(db) === 'sqlite') {
		const raw = rawHandle(db);
		return db.connection().execute(async (conn) => {
			if (options.rollback) sqliteStatement(raw, 'begin deferred').run();
			else await beginImmediate(raw);
			try {
				const result = await work(sqliteSession(raw, conn));
				sqliteStatement(raw, options.rollback ? 'rollback' : 'commit').run();
				return result;
			} catch (error) {
				if (raw.inTransaction) sqliteStatement(raw, 'rollback').run();
				throw error;
			}
		});
	}
	return db.connection().execute(async (conn) => {
		const session = postgresSession(conn);
		await session.run('begin');
		try {
			await session.run('select pg_advisory_xact_lock(?)', [LOCK_IDS[options.lock]]);
			const result = await work(session);
			await session.run(options.rollback ? 'rollback' : 'commit');
			return result;
		} catch (error) {
			await session.run('rollback').catch(() => undefined);
			throw error;
		}
	});
}

/** Reads outside any transaction through the same portable statements. */
export async function inReadSession<T>(
	db: DB,
	work: (session: SqlSession) => Promise<T>
): Promise<T> {
	if (engineOf(db) === 'sqlite') {
		const raw = rawHandle(db);
		return db.connection().execute((conn) => work(sqliteSession(raw, conn)));
	}
	return db.connection().execute((conn) => work(postgresSession(conn)));
}

/** A unique-constraint violation on either engine. */
export function isUniqueViolation(error: unknown): boolean {
	const code = (error as { code?: string } | null)?.code;
	return (
		code === '23505' ||
		code === 'SQLITE_CONSTRAINT_UNIQUE' ||
		code === 'SQLITE_CONSTRAINT_PRIMARYKEY'
	);
}

/** `?, ?, ?` for an `in (…)` list of n values (n ≥ 1). */
export function placeholders(n: number): string {
	return n <= 0 ? 'null' : new Array(n).fill('?').join(', ');
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type AnyKysely = Kysely<any>;
