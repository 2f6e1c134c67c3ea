import { execFile } from 'node:child_process';
import path from 'node:path';
import { promisify } from 'node:util';
import cron, { type ScheduledTask } from 'node-cron';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { startFakeMail, type FakeMail } from '../../fakes/mail/server';
import {
	databaseEnvFor,
	openSharedTestDatabase,
	reopenDatabase,
	testEngine,
	type DB
} from '../../src/lib/server/db/connect';
import { createMailer, type Mailer } from '../../src/lib/server/mail/transport';
import { runNotices } from '../../src/lib/server/notices';
import { runSlotCoordinator, takeRunSlot } from '../../src/lib/server/notices/run-slots';
import { expectToolroomToldOnce, NOW, ORIGIN, seedPlant } from './notices-support';

// Two writers on one plant database, as two app processes would be: on SQLite two handles on one
// file, on the PostgreSQL pass two pools on one schema (`reopenDatabase`), and two processes of
// `npm run notices:run` pointed at the same database (`databaseEnvFor`).

const run = promisify(execFile);

let mail: FakeMail;
/** The first handle; the tests open the second (or the child processes) on the same database. */
let first: DB;

beforeAll(async () => {
	mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
});
afterAll(async () => {
	await mail.close();
});
beforeEach(async () => {
	mail.clear();
	first = await openSharedTestDatabase();
	await seedPlant(first);
});
afterEach(async () => {
	await first.destroy();
});

function mailers(n: number): Mailer[] {
	return Array.from({ length: n }, () =>
		createMailer({ smtpUrl: `smtp://127.0.0.1:${mail.smtpPort}`, from: 'Castellan <c@plant.test>' })
	);
}

const expectEachToldOnce = (db: DB) => expectToolroomToldOnce(db, mail.messages());

describe(`two runs at once on one database (${testEngine()})`, () => {
	it('write nothing twice and send each digest once (two handles, one process)', async () => {
		const second = reopenDatabase(first);
		const [ma, mb] = mailers(2);
		try {
			const [ra, rb] = await Promise.all([
				runNotices(first, { now: NOW, mailer: ma, origin: ORIGIN }),
				runNotices(second, { now: NOW, mailer: mb, origin: ORIGIN })
			]);
			// 4 items stand (D-9001 coming up, D-9002 due, D-9003 overdue, D-9005 at 92 % of life).
			expect(ra.written + rb.written).toBe(4);
			// One digest each for the two toolroom recipients, whichever run sent it.
			expect(ra.digests + rb.digests).toBe(2);
			await expectEachToldOnce(first);
		} finally {
			ma.close();
			mb.close();
			await second.destroy();
		}
	});

	it('write nothing twice and send each digest once (two processes of notices:run)', async () => {
		const script = path.resolve('scripts/notices-run.ts');
		const env = {
			...process.env,
			...databaseEnvFor(first),
			SMTP_URL: `smtp://127.0.0.1:${mail.smtpPort}`,
			ORIGIN
		};
		const outputs = await Promise.all(
			[1, 2].map(() =>
				run(process.execPath, ['--import', 'tsx', script, '--now', NOW], { env, timeout: 60_000 })
			)
		);
		for (const { stdout } of outputs) expect(stdout).toContain('items standing      4');
		await expectEachToldOnce(first);
	}, 90_000);
});

describe(`scheduled slots across processes (${testEngine()})`, () => {
	it('each slot key is taken by exactly one of two handles asking at once', async () => {
		const second = reopenDatabase(first);
		try {
			const keys = Array.from({ length: 12 }, (_, i) => `castellan-notices:slot-${i}`);
			const answers = await Promise.all(
				keys.flatMap((key) => [
					takeRunSlot(first, key, 'process-a').then((ok) => ({ key, ok })),
					takeRunSlot(second, key, 'process-b').then((ok) => ({ key, ok }))
				])
			);
			for (const key of keys) {
				expect(answers.filter((a) => a.key === key && a.ok)).toHaveLength(1);
			}
			const rows = await first.selectFrom('job_runs').select(['run_key', 'taken_by']).execute();
			expect(rows.map((r) => r.run_key).sort()).toEqual([...keys].sort());
			// Asking again later (a process whose clock is behind) gets nothing.
			expect(await takeRunSlot(second, keys[0], 'process-b')).toBe(false);
		} finally {
			await second.destroy();
		}
	});

	it('the job scheduled in two processes runs once per slot and tells each recipient once', async () => {
		const second = reopenDatabase(first);
		const handles = { a: first, b: second };
		const [ma, mb] = mailers(2);
		const asked = { a: new Set<string>(), b: new Set<string>() };
		const ran: string[] = [];
		const tasks: ScheduledTask[] = [];
		try {
			for (const [side, db, mailer] of [
				['a', handles.a, ma],
				['b', handles.b, mb]
			] as const) {
				// The app's coordinator over this side's own handle, watched to see who asked for what.
				const inner = runSlotCoordinator(() => db, `process-${side}`);
				tasks.push(
					cron.schedule(
						// Every second, so that both sides meet the same slots within a few seconds.
						'* * * * * *',
						() => runNotices(db, { now: NOW, mailer, origin: ORIGIN }),
						{
							name: 'castellan-notices',
							noOverlap: true,
							distributed: true,
							runCoordinator: {
								async shouldRun(key, ttl) {
									asked[side].add(key);
									const taken = await inner.shouldRun(key, ttl);
									if (taken) ran.push(key);
									return taken;
								},
								onComplete: inner.onComplete
							}
						}
					)
				);
			}
			// Until both sides were asked for the same three slots (under load a side may miss one).
			const shared = () => [...asked.a].filter((k) => asked.b.has(k));
			for (let i = 0; i < 300 && shared().length < 3; i++) {
				await new Promise((resolve) => setTimeout(resolve, 100));
			}
			for (const task of tasks) await task.destroy();
			expect(shared().length).toBeGreaterThanOrEqual(3);
			// Each slot asked for ran once in all: never on both sides.
			expect([...ran].sort()).toEqual([...new Set([...asked.a, ...asked.b])].sort());
			// Let the last run end (it is recorded as finished by the coordinator).
			for (let i = 0; i < 100; i++) {
				const open = await first
					.selectFrom('job_runs')
					.select('run_key')
					.where('finished_at', 'is', null)
					.execute();
				if (open.length === 0) break;
				await new Promise((resolve) => setTimeout(resolve, 100));
			}
			await expectEachToldOnce(first);
		} finally {
			for (const task of tasks) await task.destroy();
			ma.close();
			mb.close();
			await second.destroy();
		}
	}, 60_000);
});
