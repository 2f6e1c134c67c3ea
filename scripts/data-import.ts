// npm run data:import -- FILE.zip — restores a plant archive into an empty database and photo store.
import fs from 'node:fs';
import { restoreArchive } from '../src/lib/server/archive/restore';
import { photoStoreFromEnv } from '../src/lib/server/photos/photo-store';
import { fail, openMigratedDatabase } from './lib/cli';

const source = process.argv[2];
if (!source || !fs.existsSync(source))
	fail('name an archive written by data:export', 'npm run data:import -- FILE.zip');
const db = await openMigratedDatabase();
try {
	const photoStore = photoStoreFromEnv(process.env);
	const res = await restoreArchive(db, new Uint8Array(fs.readFileSync(source)), photoStore);
	if (!res.ok) fail(`${res.message} Nothing was written.`);
	const rows = Object.entries(res.tables)
		.map(([t, n]) => `${t} ${n}`)
		.join(', ');
	console.log(
		`Restored ${source}: ${rows}; ${res.photos} photo files into the ${photoStore.where}.`
	);
	console.log(
		'Passwords are not in the archive: give each person a new one (npm run user:add for an admin).'
	);
} finally {
	await db.destroy();
}
