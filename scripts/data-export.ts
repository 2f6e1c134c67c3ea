// npm run data:export -- FILE.zip — the whole plant as CSV files and photos in one ZIP.
import fs from 'node:fs';
import { buildArchive } from '../src/lib/server/archive/export';
import { photoStoreFromEnv } from '../src/lib/server/photos/photo-store';
import { fail, openMigratedDatabase } from './lib/cli';

const target = process.argv[2];
if (!target || !target.endsWith('.zip'))
	fail('name the ZIP file to write', 'npm run data:export -- FILE.zip');
const db = await openMigratedDatabase();
try {
	const { zip, summary } = await buildArchive(db, photoStoreFromEnv(process.env));
	fs.writeFileSync(target, zip);
	const rows = Object.entries(summary.tables)
		.map(([t, n]) => `${t} ${n}`)
		.join(', ');
	console.log(
		`Wrote ${target} (${(summary.bytes / 1024).toFixed(0)} KiB): ${rows}; ${summary.photos} photo files.`
	);
} catch (err) {
	fail((err as Error).message);
} finally {
	await db.destroy();
}
