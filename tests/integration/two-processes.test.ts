// Two `node build` processes against one PostgreSQL database behave as one app: the shot ledger's
// idempotency keys, sessions, the sign-in throttle and the notice job are shared through the
// database, not held in a process. Runs on the suite's PostgreSQL pass (`npm run test:pg`, which
// `npm test` runs after the e2e build) and needs that build: the processes are the real server,
// started as `npm start` starts it.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, test } from 'vitest';
import { startFakeMail, type FakeMail } from '../../fakes/mail/server';
import { createScratchDatabase, type ScratchDatabase } from '../../scripts/lib/pg-scratch';
import {
	migrateToLatest,
	openDatabase,
	testEngine,
	type DB
} from '../../src/lib/server/db/connect';
import { createApiToken } from '../../src/lib/server/auth/tokens';
import { MAX_FAILURES_PER_ACCOUNT } from '../../src/lib/server/auth/throttle';
import { createUser } from '../../src/lib/server/users/users';
import { closedPort, expectToolroomToldOnce, seedPlant } from './notices-support';

const BUILD = path.resolve('build/index.js');

function skipReason(): string | null {
	if (testEngine() !== 'postgres' || !process.env.TEST_DATABASE_URL) {
		return 'needs PostgreSQL: runs on the PostgreSQL pass (TEST_DATABASE_URL set, npm run test:pg)';
	}
	if (!fs.existsSync(BUILD)) return 'needs the built app: run `npm run build` first';
	return null;
}
const reason = skipReason();
if (reason) console.warn(`two-processes.test.ts skipped: ${reason}`);

const PASSWORD = 'two-processes-pass-1';
const ADMIN = 'ops@cluster.test';
const ADMIN_NAME = 'Olga Two-Process';
const PLANNER = 'planner@cluster.test';
const DIE = 'S-0001';

/** One `node build` process and everything it has printed, line by line with arrival times. */
interface App {
	name: string;
	base: string;
	child: ChildProcess;
	lines: { at: number; text: string }[];
}

async function startApp(name: string, env: Record<string, string>): Promise<App> {
	const port = await closedPort();
	const base = `http://127.0.0.1:${port}`;
	const child = spawn(process.execPath, ['scripts/start.js'], {
		stdio: ['ignore', 'pipe', 'pipe'],
		env: {
			...process.env,
			...env,
			NODE_ENV: 'production',
			PORT: String(port),
			HOST: '127.0.0.1',
			ORIGIN: base
		}
	});
	const app: App = { name, base, child, lines: [] };
	for (const stream of [child.stdout!, child.stderr!]) {
		let rest = '';
		stream.setEncoding('utf8');
		stream.on('data', (chunk: string) => {
			const parts = (rest + chunk).split('\n');
			rest = parts.pop()!;
			for (const text of parts) app.lines.push({ at: Date.now(), text });
		});
	}
	return app;
}

const output = (app: App, last = 200) =>
	app.lines
		.slice(-last)
		.map((l) => `  ${l.text}`)
		.join('\n');

/** SIGTERM, and SIGKILL when the process is still there 10 s later. */
function stopApp(app: App): Promise<void> {
	return new Promise((resolve) => {
		if (app.child.exitCode !== null || app.child.signalCode !== null) return resolve();
		const kill = setTimeout(() => app.child.kill('SIGKILL'), 10_000);
		app.child.once('exit', () => {
			clearTimeout(kill);
			resolve();
		});
		app.child.kill('SIGTERM');
	});
}

/** Polls until `check` holds; fails with `what` and both processes' output when it never does. */
async function waitFor(
	what: string,
	check: () => boolean | Promise<boolean>,
	apps: App[],
	limitMs: number
) {
	const until = Date.now() + limitMs;
	while (!(await check())) {
		const dead = apps.find((a) => a.child.exitCode !== null);
		if (dead || Date.now() > until) {
			const story = apps.map((a) => `${a.name} printed:\n${output(a)}`).join('\n');
			throw new Error(`${dead ? `${dead.name} exited` : 'Gave up'} waiting for ${what}.\n${story}`);
		}
		await new Promise((r) => setTimeout(r, 250));
	}
}

async function answers(url: string): Promise<boolean> {
	try {
		return (await fetch(url)).status === 200;
	} catch {
		return false;
	}
}

/** A form post as a browser without JavaScript sends it (SvelteKit checks the Origin). */
function postForm(app: App, pathname: string, fields: Record<string, string>, cookie?: string) {
	return fetch(app.base + pathname, {
		method: 'POST',
		redirect: 'manual',
		headers: {
			origin: app.base,
			accept: 'text/html',
			'content-type': 'application/x-www-form-urlencoded',
			...(cookie ? { cookie } : {})
		},
		body: new URLSearchParams(fields)
	});
}

function sessionCookie(response: Response): string {
	const cookie = response.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.find((c) => c.startsWith('castellan_session=') && c !== 'castellan_session=');
	if (!cookie) throw new Error(`No session cookie in the answer (status ${response.status}).`);
	return cookie;
}

function getPage(app: App, pathname: string, cookie?: string) {
	return fetch(app.base + pathname, {
		redirect: 'manual',
		headers: cookie ? { cookie } : {}
	});
}

/** What the notice job prints after each daily run (src/lib/server/notices/cron.ts). */
const DAILY_RUN = /^Castellan notices \(daily run\)/;

/** Seconds past the minute on the wall clock, which node-cron follows. */
const secondOfMinute = () => new Date().getSeconds() + new Date().getMilliseconds() / 1000;

describe.skipIf(reason !== null)('two app processes on one PostgreSQL database', () => {
	let scratch: ScratchDatabase;
	let db: DB;
	let mail: FakeMail;
	let uploads: string;
	let token: string;
	let apps: App[] = [];

	beforeAll(async () => {
		scratch = await createScratchDatabase(process.env.TEST_DATABASE_URL!, 'twoapps');
		db = openDatabase(scratch.url, { poolSize: 2 });
		await migrateToLatest(db);

		// The plant before the processes start: an admin and a planner who sign in, one die with
		// both halves whose ledger starts empty, and a token to count shots with.
		await createUser(db, {
			email: ADMIN,
			name: ADMIN_NAME,
			role: 'admin',
			customerId: null,
			password: PASSWORD
		});
		await createUser(db, {
			email: PLANNER,
			name: 'Planner',
			role: 'scheduler',
			customerId: null,
			password: PASSWORD
		});
		const customer = await db
			.insertInto('customers')
			.values({ code: 'SHOTCO', name: 'Shot Counting Ltd' })
			.returning('id')
			.executeTakeFirstOrThrow();
		const alloy = await db
			.selectFrom('alloys')
			.select('id')
			.where('code', '=', 'A380')
			.executeTakeFirstOrThrow();
		const created = '2026-01-01T00:00:00.000Z';
		const die = await db
			.insertInto('dies')
			.values({
				number: DIE,
				part_name: 'Shared ledger housing',
				customer_id: customer.id,
				alloy_id: alloy.id,
				process: 'cold_chamber',
				cavities: 1,
				projected_area_cm2: 200,
				created_at: created,
				updated_at: created
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await db
			.insertInto('die_halves')
			.values(
				(['cover', 'ejector'] as const).map((side) => ({
					die_id: die.id,
					side,
					serial: `${DIE}-${side}`,
					installed_at: created
				}))
			)
			.execute();
		({ token } = await createApiToken(db, {
			name: 'two processes',
			scopes: ['shots:write'],
			customerId: null,
			createdBy: null
		}));

		mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
		uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-two-'));
		const env = {
			DATABASE_URL: scratch.url,
			DATABASE_POOL_SIZE: '5',
			UPLOAD_DIR: uploads,
			SMTP_URL: `smtp://127.0.0.1:${mail.smtpPort}`,
			MAIL_FROM: 'Castellan <castellan@cluster.test>',
			// The daily notice run every minute, so both processes run it at the same minutes.
			NOTICE_CRON: '* * * * *',
			PRESS_IDLE_CHECK: 'off'
		};
		apps = await Promise.all([startApp('app A', env), startApp('app B', env)]);
		await waitFor(
			'both processes to answer',
			async () => (await Promise.all(apps.map((a) => answers(`${a.base}/sign-in`)))).every(Boolean),
			apps,
			90_000
		);
	}, 150_000);

	afterAll(async () => {
		await Promise.all(apps.map(stopApp));
		await mail?.close();
		await db?.destroy();
		await scratch?.drop();
		if (uploads) fs.rmSync(uploads, { recursive: true, force: true });
	}, 60_000);

	// What the servers said is the first thing to read when a check here fails.
	afterEach(({ task }) => {
		if (task.result?.state !== 'fail') return;
		for (const app of apps) {
			console.log(`${app.name} printed (last 40 lines):\n${output(app, 40)}`);
		}
	});

	test('the same shot batches with the same keys sent to both at once are counted once', async () => {
		// 10 batches of 20 entries; entry i of each batch counts i + 1 shots, so a batch counts
		// 1 + 2 + … + 20 = 210 shots and all ten 2 100. Every batch goes to both processes at once.
		const batches = Array.from({ length: 10 }, (_, b) =>
			Array.from({ length: 20 }, (_, i) => ({
				die: DIE,
				shots: i + 1,
				countedAt: new Date(Date.UTC(2026, 10, 2, 6) + (b * 20 + i) * 60_000).toISOString(),
				key: `two-processes:${b}:${i}`
			}))
		);
		const post = (app: App, body: unknown) =>
			fetch(`${app.base}/api/v1/shots`, {
				method: 'POST',
				headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
				body: JSON.stringify(body)
			}).then(async (r) => ({ status: r.status, body: await r.json() }));
		const answered = await Promise.all(
			batches.map((batch) => Promise.all(apps.map((app) => post(app, batch))))
		);
		for (const pair of answered) {
			for (const a of pair) expect(a.status, JSON.stringify(a.body)).toBe(201);
			// Each entry is accepted by exactly one process; the other acknowledges its key.
			expect(pair[0].body.accepted + pair[1].body.accepted).toBe(20);
			expect(pair[0].body.duplicates + pair[1].body.duplicates).toBe(20);
		}

		const rows = await db
			.selectFrom('shot_entries')
			.innerJoin('dies', 'dies.id', 'shot_entries.die_id')
			.select((eb) => [
				eb.fn.countAll<number>().as('n'),
				eb.fn.sum<number>('shot_entries.shots').as('sum'),
				eb.fn.count<number>('shot_entries.idem_key').distinct().as('keys')
			])
			.where('dies.number', '=', DIE)
			.executeTakeFirstOrThrow();
		expect(rows).toEqual({ n: 200, sum: 2100, keys: 200 });
		const die = await db
			.selectFrom('dies')
			.select('total_shots')
			.where('number', '=', DIE)
			.executeTakeFirstOrThrow();
		expect(die.total_shots).toBe(2100);
		const halves = await db
			.selectFrom('die_halves')
			.innerJoin('dies', 'dies.id', 'die_halves.die_id')
			.select(['die_halves.side', 'die_halves.shots'])
			.where('dies.number', '=', DIE)
			.orderBy('die_halves.side')
			.execute();
		expect(halves).toEqual([
			{ side: 'cover', shots: 2100 },
			{ side: 'ejector', shots: 2100 }
		]);
		const daily = await db
			.selectFrom('shot_daily')
			.innerJoin('dies', 'dies.id', 'shot_daily.die_id')
			.select((eb) => eb.fn.sum<number>('shot_daily.shots').as('sum'))
			.where('dies.number', '=', DIE)
			.executeTakeFirstOrThrow();
		expect(daily.sum).toBe(2100);
	});

	test('a session made by one process works on the other, and signing out on it ends it on both', async () => {
		const [a, b] = apps;
		expect((await getPage(b, '/plant')).status).toBe(303);

		const signIn = await postForm(a, '/sign-in', { email: ADMIN, password: PASSWORD });
		expect(signIn.status).toBe(303);
		expect(signIn.headers.get('location')).toBe('/plant');
		const cookie = sessionCookie(signIn);

		const onB = await getPage(b, '/plant', cookie);
		expect(onB.status).toBe(200);
		expect(await onB.text()).toContain(ADMIN_NAME);
		expect((await getPage(a, '/plant', cookie)).status).toBe(200);

		expect((await postForm(b, '/sign-out', {}, cookie)).status).toBe(303);
		const afterSignOut = await getPage(a, '/plant', cookie);
		expect(afterSignOut.status).toBe(303);
		expect(afterSignOut.headers.get('location')).toMatch(/^\/sign-in/);
	});

	test('failed sign-ins on both processes count against one allowance', async () => {
		const [a, b] = apps;
		// MAX_FAILURES_PER_ACCOUNT (5) wrong passwords, 3 on A and 2 on B. Were they counted per
		// process, neither would have reached 5 and the right password would get in.
		expect(MAX_FAILURES_PER_ACCOUNT).toBe(5);
		const wrong = await Promise.all(
			[a, b, a, b, a].map((app) =>
				postForm(app, '/sign-in', { email: PLANNER, password: 'not-it-at-all' })
			)
		);
		for (const r of wrong) expect(r.status).toBe(400);
		for (const app of [b, a]) {
			const blocked = await postForm(app, '/sign-in', { email: PLANNER, password: PASSWORD });
			expect(blocked.status).toBe(429);
			expect(await blocked.text()).toContain('Too many failed sign-ins');
		}
	});

	test('the notice job runs in both processes at the same minute and sends each notice once', async () => {
		// Seed the plant of the notice tests (4 items for two toolroom recipients) in one
		// transaction, well inside a minute, so the next minute's runs in both processes find it.
		while (secondOfMinute() < 5 || secondOfMinute() > 45)
			await new Promise((r) => setTimeout(r, 500));
		const seeded = new Date();
		await db.transaction().execute((tx) => seedPlant(tx, seeded.toISOString()));
		const nextMinute = Math.ceil(seeded.getTime() / 60_000) * 60_000;

		const dailyRunsSince = (app: App, since: number) =>
			app.lines.filter((l) => l.at >= since && DAILY_RUN.test(l.text));
		await waitFor(
			'a daily notice run in both processes after the plant was seeded',
			() => apps.every((app) => dailyRunsSince(app, nextMinute).length > 0),
			apps,
			150_000
		);
		// Both ran again a minute later: still nothing twice.
		await waitFor(
			'a second daily run in both processes',
			() => apps.every((app) => dailyRunsSince(app, nextMinute + 60_000).length > 0),
			apps,
			150_000
		);

		await expectToolroomToldOnce(db, mail.messages());
	}, 400_000);
});
