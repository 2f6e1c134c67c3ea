// npm run db:backup -- FILE — online backup while the app runs: of the PostgreSQL database named by
// DATABASE_URL (pg_dump's custom format), else of the SQLite file at DATABASE_PATH.
import { backupDatabase, backupPostgres, checkIntegrity } from '../src/lib/server/db/backup';
import { databaseTarget, isPostgresUrl } from '../src/lib/server/db/connect';
import { fail, shownTarget } from './lib/cli';

const target = process.argv[2];
if (!target) fail('name the backup file', 'npm run db:backup -- FILE');
const source = databaseTarget(process.env);
try {
	if (isPostgresUrl(source)) {
		const { tables, bytes } = await backupPostgres(source, target);
		console.log(
			`Backed up ${shownTarget(source)} to ${target} (pg_dump custom format, ${tables} tables, ${Math.ceil(bytes / 1024)} KB).`
		);
	} else {
		const { pages } = await backupDatabase(source, target);
		console.log(
			`Backed up ${source} to ${target} (${pages} pages, integrity ${checkIntegrity(target)}).`
		);
	}
	console.log(
		'Photos are not in the database: copy UPLOAD_DIR too (e.g. rsync -a data/uploads/ …), or with ' +
			"PHOTO_STORE=s3 keep the bucket's own versioning or replication."
	);
} catch (err) {
	fail((err as Error).message);
}
