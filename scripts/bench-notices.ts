// Database time of the notice job on 10 000 dies (40 000 service tasks) in a temporary file
// database, against a mailer that accepts instantly (SMTP is not timed): the daily run (a day
// after the first, so a few tasks are new), a repeat run (nothing new), and the first run ever
// with the whole backlog new (split into find + write and send).
//   npx tsx scripts/bench-notices.ts        (also part of `npm run bench`)
import { runWhenCalledDirectly, type BenchFigure } from './lib/bench-report';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { migrateToLatest, openDatabase, rawHandle, type DB } from '../src/lib/server/db/connect';
import { findNoticeItems } from '../src/lib/server/notices/find';
import { listNoticeRecipients, writeOutbox } from '../src/lib/server/notices/outbox';
import { sendPending } from '../src/lib/server/notices/send';

const DIES = 10_000;
const TARGET_MS = 1000;
const NOW = '2026-03-02T06:00:00.000Z';
const DAY = 86_400_000;

/** Small deterministic generator, so every run times the same plant. */
function random(seed: number) {
	let s = seed >>> 0;
	return () => {
		s = (Math.imul(s, 1_664_525) + 1_013_904_223) >>> 0;
		return s / 2 ** 32;
	};
}

async function seedFleet(db: DB): Promise<void> {
	const raw = rawHandle(db);
	const rand = random(42);
	const alloys = raw.prepare('select id, expected_life_shots from alloys').all() as {
		id: number;
		expected_life_shots: number;
	}[];
	raw.transaction(() => {
		raw.prepare(`insert into customers (code, name) values ('BENCH', 'Bench Castings')`).run();
		const user = raw.prepare(
			`insert into users (id, email, name, role, password_hash) values (?, ?, ?, ?, 'x')`
		);
		user.run('b-lead', 'lead@bench.test', 'Lead', 'toolroom_lead');
		user.run('b-maker', 'maker@bench.test', 'Maker', 'toolmaker');
		const die = raw.prepare(
			`insert into dies (number, part_name, customer_id, alloy_id, process, cavities,
			   projected_area_cm2, status, total_shots)
			 values (?, ?, 1, ?, 'cold_chamber', 1, 150, ?, ?)`
		);
		const task = raw.prepare(
			`insert into service_tasks (die_id, kind, interval_shots, interval_days, last_done_at,
			   last_done_shots) values (?, ?, ?, ?, ?, ?)`
		);
		for (let i = 0; i < DIES; i++) {
			const alloy = alloys[i % alloys.length];
			const total = Math.floor(rand() * alloy.expected_life_shots * 1.05);
			const status = i % 50 === 0 ? 'retired' : 'running';
			const id = Number(
				die.run(`B-${String(i).padStart(5, '0')}`, `Bench part ${i}`, alloy.id, status, total)
					.lastInsertRowid
			);
			// A plant that mostly keeps up: nine tasks in ten inside their interval, one in ten late
			// by up to 30 %. Roughly a fifth of all tasks then stand at coming up or worse.
			const share = () => (rand() < 0.9 ? rand() : 1 + rand() * 0.3);
			const since = (interval: number) => Math.max(0, total - Math.floor(share() * interval));
			const doneAt = (days: number) =>
				new Date(Date.parse(NOW) - share() * days * DAY).toISOString();
			task.run(id, 'stress_relief', 15_000, null, doneAt(60), since(15_000));
			task.run(id, 'surface_inspection', 10_000, 30, doneAt(30), since(10_000));
			task.run(id, 'cooling_flush', null, 90, doneAt(90), 0);
			task.run(id, 'teardown', 50_000, 365, doneAt(365), since(50_000));
		}
	})();
}

/** Wall-clock and CPU milliseconds (user + system) of this process, which runs SQLite in-line. */
async function time<T>(fn: () => Promise<T>): Promise<{ ms: number; cpuMs: number; result: T }> {
	const cpu = process.cpuUsage();
	const started = performance.now();
	const result = await fn();
	const used = process.cpuUsage(cpu);
	return { ms: performance.now() - started, cpuMs: (used.user + used.system) / 1000, result };
}

export async function run(): Promise<BenchFigure[]> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-bench-notices-'));
	const db = openDatabase(path.join(dir, 'bench.db'));
	try {
		await migrateToLatest(db);
		await seedFleet(db);
		const noop = { send: async () => ({ messageId: '<bench@localhost>' }) };
		// The job as the server runs it, split so the send step can be read apart.
		const findAndWrite = async (now: string) => {
			const items = await findNoticeItems(db, now, 0.9);
			const recipients = await listNoticeRecipients(db);
			const written = await writeOutbox(db, items, recipients, now);
			return { items: items.length, ...written };
		};
		const send = (now: string) => sendPending(db, noop, now, { origin: 'http://localhost' });

		// First run ever: the whole backlog is new.
		const first = await time(() => findAndWrite(NOW));
		const firstSend = await time(() => send(NOW));
		// The same morning again: nothing is new.
		const repeat = await time(() => findAndWrite(NOW));
		// The next morning: a day later some tasks cross a band by the calendar.
		const tomorrow = new Date(Date.parse(NOW) + DAY).toISOString();
		const daily = await time(() => findAndWrite(tomorrow));
		const dailySend = await time(() => send(tomorrow));

		console.log(
			`  ${DIES} dies, ${DIES * 4} tasks: first run ${first.result.items} items, all new ` +
				`(${first.result.deliveries} deliveries, ${firstSend.result.digests} digests); ` +
				`repeat run ${repeat.result.notices} new; next day ${daily.result.notices} new ` +
				`(${dailySend.result.digests} digests)`
		);
		console.log(
			`  CPU ms: first ${first.cpuMs.toFixed(0)} + send ${firstSend.cpuMs.toFixed(0)}, ` +
				`repeat ${repeat.cpuMs.toFixed(0)}, next day ${daily.cpuMs.toFixed(0)} + send ` +
				`${dailySend.cpuMs.toFixed(0)} (figures are wall time; on a busy machine they run higher)`
		);
		const figure = (name: string, ms: number): BenchFigure => ({
			figure: name,
			value: ms,
			unit: 'ms',
			target: `< ${TARGET_MS} ms`,
			pass: ms < TARGET_MS,
			ratio: ms / TARGET_MS
		});
		return [
			figure('notices: daily run, 10 000 dies (find + write + send)', daily.ms + dailySend.ms),
			figure('notices: repeat run, nothing new (find + write)', repeat.ms),
			figure('notices: first run, backlog all new (find + write)', first.ms),
			figure('notices: first run, backlog all new (send, no-op mailer)', firstSend.ms)
		];
	} finally {
		await db.destroy();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

await runWhenCalledDirectly(import.meta.url, run);
