// npm run db:restore -- FILE — replace DATABASE_PATH with a backup. Stop the app first.
import { restoreDatabase } from '../src/lib/server/db/backup';
import { databasePath, fail } from './lib/cli';

const source = process.argv[2];
if (!source) fail('name the backup file to restore', 'npm run db:restore -- FILE');
try {
	restoreDatabase(source, databasePath());
	console.log(`Restored ${databasePath()} from ${source}. Start the app again.`);
} catch (err) {
	fail((err as Error).message);
}
