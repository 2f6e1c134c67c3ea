// npm run db:restore -- FILE — replace the database with a backup. Stop the app first.
// PostgreSQL (DATABASE_URL): pg_restore --clean --if-exists into that database, in one
// transaction. SQLite: the file at DATABASE_PATH is replaced.
import { restoreDatabase, restorePostgres } from '../src/lib/server/db/backup';
import { databaseTarget, isPostgresUrl } from '../src/lib/server/db/connect';
import { fail, shownTarget } from './lib/cli';

const source = process.argv[2];
if (!source) fail('name the backup file to restore', 'npm run db:restore -- FILE');
const target = databaseTarget(process.env);
try {
	if (isPostgresUrl(target)) {
		const { tables } = await restorePostgres(source, target);
		console.log(
			`Restored ${shownTarget(target)} from ${source} (${tables} tables). Start the app again.`
		);
	} else {
		restoreDatabase(source, target);
		console.log(`Restored ${target} from ${source}. Start the app again.`);
	}
} catch (err) {
	fail((err as Error).message);
}
