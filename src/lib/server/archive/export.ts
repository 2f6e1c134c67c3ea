import { zipSync, type Zippable } from 'fflate';
import { rawHandle, type DB } from '../db/connect';
import type { PhotoStore } from '../photos/photo-store';
import { ARCHIVE_TABLES } from './tables';

/**
 * One CSV cell: NULL is an empty unquoted field, text is always quoted (so an empty text stays
 * distinguishable from NULL on the way back), numbers are written as they are stored.
 */
function csvCell(v: unknown): string {
	if (v === null || v === undefined) return '';
	if (typeof v === 'number' || typeof v === 'bigint') return String(v);
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
	const raw = rawHandle(db);
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
	await db.connection().execute(async () => {
		raw
			.transaction(() => {
				for (const t of ARCHIVE_TABLES) {
					const cols = (
						raw.prepare(`select name from pragma_table_info(?)`).all(t.table) as { name: string }[]
					).map((c) => c.name);
					if (!cols.length) continue;
					const lines = [cols.map((c) => csvCell(c)).join(',')];
					let n = 0;
					for (const row of raw
						.prepare(`select * from "${t.table}" order by rowid`)
						.iterate() as Iterable<Record<string, unknown>>) {
						lines.push(cols.map((c) => csvCell(t.redact?.[c] ?? row[c])).join(','));
						if (t.table === 'photos')
							photoFiles.push(String(row.full_file), String(row.thumb_file));
						n++;
					}
					files[t.file] = enc.encode(lines.join('\r\n') + '\r\n');
					summary.tables[t.table] = n;
					readme.push(`${t.file} (${n} rows): ${t.about}`, `  columns: ${cols.join(', ')}`);
				}
			})
			.deferred();
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
