import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { startFakeMail, type FakeMail } from '../../fakes/mail/server';
import { migrateToLatest, openDatabase, type DB } from '../../src/lib/server/db/connect';
import { createMailer, type Mailer } from '../../src/lib/server/mail/transport';
import { runNotices } from '../../src/lib/server/notices';
import { expectToolroomToldOnce, NOW, ORIGIN, seedPlant } from './notices-support';

const run = promisify(execFile);

let mail: FakeMail;
let dir: string;
let file: string;

beforeAll(async () => {
	mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
});
afterAll(async () => {
	await mail.close();
});
beforeEach(async () => {
	mail.clear();
	dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-notices-'));
	file = path.join(dir, 'plant.db');
	const db = openDatabase(file);
	await migrateToLatest(db);
	await seedPlant(db);
	await db.destroy();
});
afterEach(() => {
	fs.rmSync(dir, { recursive: true, force: true });
});

const expectEachToldOnce = (db: DB) => expectToolroomToldOnce(db, mail.messages());

describe('two runs at once on one database file', () => {
	it('write nothing twice and send each digest once (two handles, one process)', async () => {
		const a = openDatabase(file);
		const b = openDatabase(file);
		const mailers: Mailer[] = [a, b].map(() =>
			createMailer({
				smtpUrl: `smtp://127.0.0.1:${mail.smtpPort}`,
				from: 'Castellan <c@plant.test>'
			})
		);
		try {
			const [ra, rb] = await Promise.all([
				runNotices(a, { now: NOW, mailer: mailers[0], origin: ORIGIN }),
				runNotices(b, { now: NOW, mailer: mailers[1], origin: ORIGIN })
			]);
			expect(ra.written + rb.written).toBe(4);
			expect(ra.digests + rb.digests).toBe(2);
			await expectEachToldOnce(a);
		} finally {
			for (const m of mailers) m.close();
			await a.destroy();
			await b.destroy();
		}
	});

	it('write nothing twice and send each digest once (two processes of notices:run)', async () => {
		const script = path.resolve('scripts/notices-run.ts');
		const env = {
			...process.env,
			DATABASE_PATH: file,
			SMTP_URL: `smtp://127.0.0.1:${mail.smtpPort}`,
			ORIGIN
		};
		const outputs = await Promise.all(
			[1, 2].map(() =>
				run(process.execPath, ['--import', 'tsx', script, '--now', NOW], { env, timeout: 60_000 })
			)
		);
		for (const { stdout } of outputs) expect(stdout).toContain('items standing      4');
		const db = openDatabase(file);
		try {
			await expectEachToldOnce(db);
		} finally {
			await db.destroy();
		}
	}, 90_000);
});
