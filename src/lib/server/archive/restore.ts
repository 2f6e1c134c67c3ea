import { createHash } from 'node:crypto';
import path from 'node:path';
import { unzipSync } from 'fflate';
import { parse } from 'csv-parse/sync';
import { rawHandle, type DB } from '../db/connect';
import type { PhotoStore } from '../photos/photo-store';
import { ARCHIVE_TABLES } from './tables';

export type RestoreResult =
	{ ok: true; tables: Record<string, number>; photos: number } | { ok: false; message: string };

/** Tables the migrations fill with defaults; the archive's rows replace them. */
const DEFAULTED = ['alloys', 'service_templates', 'plant_settings'];
/** A database with a row in any of these is not empty. */
const MUST_BE_EMPTY = ['customers', 'users', 'dies', 'machines', 'shot_entries'];

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

/**
 * Restores a plant archive (buildArchive) into an empty, migrated database, and its photos into
 * the photo store. Every table in one transaction with foreign keys checked at the end; photo files are
 * checked against their sha256 before anything is written. All or nothing.
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
	const raw = rawHandle(db);
	const tables: Record<string, number> = {};
	const photos: { rel: string; bytes: Uint8Array; sha?: string }[] = [];
	const result = await db
		.connection()
		.execute(async () =>
			raw
				.transaction((): RestoreResult => {
					for (const t of MUST_BE_EMPTY) {
						const n = (raw.prepare(`select count(*) as n from "${t}"`).get() as { n: number }).n;
						if (n > 0)
							return {
								ok: false,
								message: `The database is not empty (${t} has ${n} rows). Restore into a new database file.`
							};
					}
					raw.pragma('defer_foreign_keys = ON');
					for (const t of ARCHIVE_TABLES) {
						const bytes = files[t.file];
						if (!bytes) continue;
						const { columns, rows } = readCsv(bytes);
						const have = new Set(
							(
								raw.prepare('select name from pragma_table_info(?)').all(t.table) as {
									name: string;
								}[]
							).map((c) => c.name)
						);
						const unknown = columns.filter((c) => !have.has(c));
						if (unknown.length) {
							throw new Error(
								`${t.file} has columns this database does not know (${unknown.join(', ')}): update Castellan first.`
							);
						}
						if (DEFAULTED.includes(t.table)) raw.prepare(`delete from "${t.table}"`).run();
						const insert = raw.prepare(
							`insert into "${t.table}" (${columns.map((c) => `"${c}"`).join(', ')}) values (${columns.map(() => '?').join(', ')})`
						);
						const revokedAt = columns.indexOf('revoked_at');
						for (const row of rows) {
							// Tokens come back without their secret: mark them revoked so none looks usable.
							if (t.table === 'api_tokens' && revokedAt >= 0 && row[revokedAt] === null)
								row[revokedAt] = new Date().toISOString();
							insert.run(...row);
						}
						tables[t.table] = rows.length;
						if (t.table === 'photos') {
							const iFull = columns.indexOf('full_file');
							const iThumb = columns.indexOf('thumb_file');
							const iSha = columns.indexOf('sha256');
							for (const row of rows) {
								for (const [i, sha] of [
									[iFull, row[iSha]],
									[iThumb, undefined]
								] as const) {
									const rel = String(row[i]);
									const bytes = files[`photos/${rel}`];
									if (!bytes) throw new Error(`The photo file ${rel} is missing from the archive.`);
									if (rel.includes('..') || path.isAbsolute(rel))
										throw new Error(`The photo path ${rel} is not allowed.`);
									if (sha && createHash('sha256').update(bytes).digest('hex') !== sha) {
										throw new Error(`The photo file ${rel} does not match its checksum.`);
									}
									photos.push({ rel, bytes });
								}
							}
						}
					}
					const broken = raw.prepare('select * from pragma_foreign_key_check').all();
					if (broken.length)
						throw new Error(
							`The archive's rows do not fit together (${broken.length} broken references).`
						);
					return { ok: true, tables, photos: photos.length };
				})
				.immediate()
		)
		.catch((e: Error) => ({ ok: false as const, message: e.message }));
	if (!result.ok) return result;
	for (const p of photos) {
		// A file left by an earlier attempt under the same name is replaced (put never overwrites).
		await photoStore.delete(p.rel);
		await photoStore.put(p.rel, p.bytes);
	}
	return result;
}
