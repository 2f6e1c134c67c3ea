import { zipSync, type Zippable } from 'fflate';
import type { DB } from '../db/connect';
import { inReadSession } from '../db/session';
import { quoted, tableShape } from './catalog';
import type { PhotoStore } from '../photos/photo-store';
import { ARCHIVE_TABLES } from './tables';

/**
 * One CSV cell: NULL is an empty unquoted field, text is always quoted (so an empty text stays
 * distinguishable from NULL on the way back), numbers are written as they are stored.
 */
function csvCell(v: unknown): string {
	if (v === null || v === undefined) return '';
	if (typeof v === 'number' || typeof v === 'bigint') return String(v);
	if (typeof v === 'boolean') return v ? '1' : '0';
	return `"${String(v).replace(/"/g, '""')}"`;
}

const enc = new TextEncoder();

export interface ArchiveSummary {
	tables: Record<string, number>;
	photos: number;
	bytes: number;
}

/**
 * The whole plant as a ZIP: one CSV per table (ARCHIVE_TABLES, all columns as stored), the photo
 * files under photos/, and README.txt describing each file. Read in one snapshot (a read
 * transaction), so the files agree with each other.
 */
export async function buildArchive(
	db: DB,
	photoStore: PhotoStore,
	at = new Date().toISOString()
): Promise<{ zip: Uint8Array; summary: ArchiveSummary }> {
	const files: Zippable = {};
	const summary: ArchiveSummary = { tables: {}, photos: 0, bytes: 0 };
	const readme: string[] = [
		'Castellan plant archive',
		`Written ${at} (UTC). Restore into an empty database: npm run data:import -- FILE.zip`,
		'',
		'Each CSV: UTF-8, a header row of column names, one row per record. An empty unquoted cell is',
		'no value (NULL); text is always in double quotes. Dates are ISO-8601 UTC; flags are 0/1.',
		'Cells are the stored values, unaltered: open them in a spreadsheet with care (a cell that',
		'starts with = may be read as a formula there).',
		''
	];
	const photoFiles: string[] = [];
	await inReadSession(db, async (s) => {
		// One snapshot for every table: PostgreSQL's repeatable read, SQLite's read transaction.
		await s.run(
			s.engine === 'postgres' ? 'begin isolation level repeatable read read only' : 'begin'
		);
		try {
			for (const t of ARCHIVE_TABLES) {
				const { columns: cols, primaryKey } = await tableShape(s, t.table);
				if (!cols.length) continue;
				const order = primaryKey.length ? ` order by ${quoted(primaryKey)}` : '';
				const rows = await s.all<Record<string, unknown>>(`select * from "${t.table}"${order}`);
				const lines = [cols.map((c) => csvCell(c)).join(',')];
				for (const row of rows) {
					lines.push(cols.map((c) => csvCell(t.redact?.[c] ?? row[c])).join(','));
					if (t.table === 'photos') photoFiles.push(String(row.full_file), String(row.thumb_file));
				}
				files[t.file] = enc.encode(lines.join('\r\n') + '\r\n');
				summary.tables[t.table] = rows.length;
				readme.push(`${t.file} (${rows.length} rows): ${t.about}`, `  columns: ${cols.join(', ')}`);
			}
		} finally {
			await s.run('commit');
		}
	});
	for (const rel of photoFiles) {
		const bytes = await photoStore.get(rel);
		if (!bytes) continue;
		files[`photos/${rel}`] = [bytes, { level: 0 }];
		summary.photos++;
	}
	readme.push(
		'',
		'photos/: the stored JPEG files, by the names in photos.csv (full_file, thumb_file).'
	);
	files['README.txt'] = enc.encode(readme.join('\r\n') + '\r\n');
	const zip = zipSync(files, { level: 6 });
	summary.bytes = zip.byteLength;
	return { zip, summary };
}
