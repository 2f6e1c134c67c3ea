// Starts the built app for Playwright on a fresh database seeded with the demo plant.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { migrateToLatest, openDatabase } from '../src/lib/server/db/connect';
import { startFakeS3 } from '../fakes/s3/server';
import { photoStoreFromEnv } from '../src/lib/server/photos/photo-store';
import { seedDemo } from './lib/demo-scenario';

const port = process.env.E2E_PORT ?? '4173';
const dir = path.resolve(`test-results/e2e-data-${port}`);
fs.rmSync(dir, { recursive: true, force: true });
fs.mkdirSync(path.join(dir, 'uploads'), { recursive: true });
const dbPath = path.join(dir, 'castellan.db');

if (!fs.existsSync('build/index.js')) {
	console.error('No build found: run `npm run build` first (npm run test:e2e does).');
	process.exit(1);
}
// PHOTO_STORE=s3: the photos go to a fake S3 keeping its objects beside the database, so the
// browser journeys run against a bucket; otherwise they stay in the uploads folder.
const fakeS3 =
	process.env.PHOTO_STORE === 's3'
		? await startFakeS3({ port: 0, directory: path.join(dir, 's3') })
		: null;
const photoEnv = { UPLOAD_DIR: path.join(dir, 'uploads'), ...fakeS3?.env };
const db = openDatabase(dbPath);
await migrateToLatest(db);
await seedDemo(db, new Date(), photoStoreFromEnv(photoEnv));
await db.destroy();

const app = spawn(process.execPath, ['scripts/start.js'], {
	stdio: 'inherit',
	env: {
		...process.env,
		PORT: port,
		HOST: '127.0.0.1',
		ORIGIN: `http://127.0.0.1:${port}`,
		DATABASE_PATH: dbPath,
		...photoEnv,
		NOTICE_CRON: 'off',
		SMTP_URL: process.env.E2E_SMTP_URL ?? 'smtp://127.0.0.1:2599',
		E2E_DATA_DIR: dir
	}
});
const stop = () => app.kill('SIGTERM');
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
app.on('exit', async (code) => {
	await fakeS3?.close();
	process.exit(code ?? 0);
});
