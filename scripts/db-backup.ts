// npm run db:backup -- FILE — online backup while the app runs.
import { backupDatabase, checkIntegrity } from '../src/lib/server/db/backup';
import { databasePath, fail } from './lib/cli';

const target = process.argv[2];
if (!target) fail('name the backup file', 'npm run db:backup -- FILE');
try {
	const { pages } = await backupDatabase(databasePath(), target);
	console.log(
		`Backed up ${databasePath()} to ${target} (${pages} pages, integrity ${checkIntegrity(target)}).`
	);
	console.log(
		'Photos are files under UPLOAD_DIR: copy that folder too (e.g. rsync -a data/uploads/ …).'
	);
} catch (err) {
	fail((err as Error).message);
}
