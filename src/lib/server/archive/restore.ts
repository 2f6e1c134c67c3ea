import { createHash } from 'node:crypto';
import path from 'node:path';
import { unzipSync } from 'fflate';
import { parse } from 'csv-parse/sync';
import type { DB } from '../db/connect';
import { inWriteTransaction, type SqlSession } from '../db/session';
import { quoted, tableShape, type TableShape } from './catalog';
import type { PhotoStore } from '../photos/photo-store';
import { ARCHIVE_TABLES } from './tables';

export type RestoreResult =
	{ ok: true; tables: Record<string, number>; photos: number } | { ok: false; message: string };

/** Tables the migrations fill with defaults; the archive's rows replace them. */
const DEFAULTED = ['alloys', 'service_templates', 'plant_settings'];
/** A database with a row in any of these is not empty. */
const MUST_BE_EMPTY = ['customers', 'users', 'dies', 'machines', 'shot_entries'];
/** Parameters per insert statement: many rows per round trip, well under both engines' limits. */
const PARAMS_PER_INSERT = 2000;

/** Reads one archive CSV: unquoted empty = NULL, other unquoted cells = numbers, quoted = text. */
function readCsv(bytes: Uint8Array): { columns: string[]; rows: unknown[][] } {
	const records = parse(new TextDecoder().decode(bytes), {
		cast: (value, context) => {
			if (context.header || context.quoting) return value;
			if (value === '') return null;
			const n = Number(value);
			if (Number.isNaN(n)) throw new Error(`"${value}" is neither quoted text nor a number`);
			return n;
		}
	}) as unknown[][];
	const [head, ...rows] = records;
	return { columns: (head ?? []).map(String), rows };
}

interface PhotoFile {
	rel: string;
	bytes: Uint8Array;
}

/** A foreign-key violation on either engine: a row names a record the archive does not hold. */
function isForeignKeyViolation(error: unknown): boolean {
	const code = (error as { code?: string } | null)?.code;
	return code === '23503' || code === 'SQLITE_CONSTRAINT_FOREIGNKEY';
}

/**
 * Restores a plant archive (buildArchive) into an empty, migrated database — SQLite or
 * PostgreSQL, whichever wrote it — and its photos into the photo store. Every table in one transaction;
 * photo files are checked against their sha256 before anything is written. All or nothing.
 *
 * Foreign keys are checked as rows go in, on both engines, so tables go in the archive's order
 * (owners before dies before ledger) and a reference to a row that comes later in that order
 * (a half's picture, which is a photo of an inspection of that half) or to its own table is
 * written empty first and filled in once every row is in. Ids are kept as they are in the archive;
 * on PostgreSQL each id sequence then continues after the highest id restored.
 */
export async function restoreArchive(
	db: DB,
	zip: Uint8Array,
	photoStore: PhotoStore
): Promise<RestoreResult> {
	let files: Record<string, Uint8Array>;
	try {
		files = unzipSync(zip);
	} catch {
		return { ok: false, message: 'The file is not a ZIP archive.' };
	}
	if (!files['README.txt'] || !files['dies.csv']) {
		return {
			ok: false,
			message: 'This ZIP is not a Castellan plant archive (no README.txt or dies.csv).'
		};
	}
	const photos: PhotoFile[] = [];
	let tables: Record<string, number>;
	try {
		tables = await inWriteTransaction(db, { lock: 'import' }, (s) =>
			restoreTables(s, files, photos)
		);
	} catch (e) {
		if (isForeignKeyViolation(e)) {
			return {
				ok: false,
				message: `The archive's rows do not fit together (a row names a record that is not in it): ${(e as Error).message}`
			};
		}
		return { ok: false, message: (e as Error).message };
	}
	for (const p of photos) {
		// A file left by an earlier attempt under the same name is replaced (put never overwrites).
		await photoStore.delete(p.rel);
		await photoStore.put(p.rel, p.bytes);
	}
	return { ok: true, tables, photos: photos.length };
}

async function restoreTables(
	s: SqlSession,
	files: Record<string, Uint8Array>,
	photos: PhotoFile[]
): Promise<Record<string, number>> {
	for (const t of MUST_BE_EMPTY) {
		const { n } = (await s.get<{ n: number }>(`select count(*) as n from "${t}"`))!;
		if (n > 0) {
			throw new Error(
				`The database is not empty (${t} has ${n} rows). Restore into a new, empty database.`
			);
		}
	}
	const tables: Record<string, number> = {};
	const restored = new Set<string>();
	/** Tables with an id column (PostgreSQL's sequences follow them). */
	const withId: string[] = [];
	/** References written empty at first, filled in at the end. */
	const later: { table: string; shape: TableShape; column: string; rows: unknown[][] }[] = [];
	for (const t of ARCHIVE_TABLES) {
		const bytes = files[t.file];
		if (!bytes) continue;
		const { columns, rows } = readCsv(bytes);
		const shape = await tableShape(s, t.table);
		const have = new Set(shape.columns);
		const unknown = columns.filter((c) => !have.has(c));
		if (unknown.length) {
			throw new Error(
				`${t.file} has columns this database does not know (${unknown.join(', ')}): update Castellan first.`
			);
		}
		restored.add(t.table);
		if (have.has('id')) withId.push(t.table);
		// Tokens come back without their secret: mark them revoked so none looks usable.
		const revokedAt = t.table === 'api_tokens' ? columns.indexOf('revoked_at') : -1;
		if (revokedAt >= 0) {
			const at = new Date().toISOString();
			for (const row of rows) if (row[revokedAt] === null) row[revokedAt] = at;
		}
		const deferred = shape.references
			.filter((r) => !restored.has(r.table) || r.table === t.table)
			.map((r) => columns.indexOf(r.column))
			.filter((i) => i >= 0);
		for (const i of deferred) {
			const keyAt = shape.primaryKey.map((k) => columns.indexOf(k));
			if (keyAt.some((k) => k < 0)) {
				throw new Error(`${t.file} lacks its key columns (${shape.primaryKey.join(', ')}).`);
			}
			const pending = rows
				.filter((row) => row[i] !== null)
				.map((row) => [row[i], ...keyAt.map((k) => row[k])]);
			if (pending.length) later.push({ table: t.table, shape, column: columns[i], rows: pending });
		}
		const inserted = deferred.length
			? rows.map((row) => row.map((v, i) => (deferred.includes(i) ? null : v)))
			: rows;
		if (DEFAULTED.includes(t.table)) await s.run(`delete from "${t.table}"`);
		await insertRows(s, t.table, columns, inserted);
		tables[t.table] = rows.length;
		if (t.table === 'photos') photos.push(...photoFilesOf(files, columns, rows));
	}
	for (const l of later) {
		const text = `update "${l.table}" set "${l.column}" = ? where ${l.shape.primaryKey.map((k) => `"${k}" = ?`).join(' and ')}`;
		for (const params of l.rows) await s.run(text, params);
	}
	if (s.engine === 'postgres') await continueSequences(s, withId);
	return tables;
}

/** Inserts rows with their archived values, many per statement. */
async function insertRows(s: SqlSession, table: string, columns: string[], rows: unknown[][]) {
	if (!rows.length) return;
	const perStatement = Math.max(1, Math.floor(PARAMS_PER_INSERT / columns.length));
	const tuple = `(${columns.map(() => '?').join(', ')})`;
	// PostgreSQL refuses explicit values in an identity column unless told; SQLite takes them as they are.
	const overriding = s.engine === 'postgres' ? ' overriding system value' : '';
	for (let at = 0; at < rows.length; at += perStatement) {
		const chunk = rows.slice(at, at + perStatement);
		await s.run(
			`insert into "${table}" (${quoted(columns)})${overriding} values ${chunk.map(() => tuple).join(', ')}`,
			chunk.flat()
		);
	}
}

/** PostgreSQL: each id sequence goes on after the highest id restored (SQLite does so by itself). */
async function continueSequences(s: SqlSession, tables: string[]) {
	for (const table of tables) {
		const seq = await s.get<{ name: string | null }>(
			"select pg_get_serial_sequence(?, 'id') as name",
			[table]
		);
		if (!seq?.name) continue;
		await s.get(`select setval(?, (select coalesce(max(id), 0) + 1 from "${table}"), false)`, [
			seq.name
		]);
	}
}

/** The photo files the photos table names, checked against their sha256, before any is written. */
function photoFilesOf(
	files: Record<string, Uint8Array>,
	columns: string[],
	rows: unknown[][]
): PhotoFile[] {
	const out: PhotoFile[] = [];
	const iFull = columns.indexOf('full_file');
	const iThumb = columns.indexOf('thumb_file');
	const iSha = columns.indexOf('sha256');
	for (const row of rows) {
		for (const [i, sha] of [
			[iFull, row[iSha]],
			[iThumb, undefined]
		] as const) {
			const rel = String(row[i]);
			if (rel.includes('..') || path.isAbsolute(rel))
				throw new Error(`The photo path ${rel} is not allowed.`);
			const bytes = files[`photos/${rel}`];
			if (!bytes) throw new Error(`The photo file ${rel} is missing from the archive.`);
			if (sha && createHash('sha256').update(bytes).digest('hex') !== sha) {
				throw new Error(`The photo file ${rel} does not match its checksum.`);
			}
			out.push({ rel, bytes });
		}
	}
	return out;
}
