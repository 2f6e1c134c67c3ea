// Database time of the notice job on 10 000 dies (40 000 service tasks) in a temporary file
// database: find + write on the first run (everything new), on a repeat run (nothing new), and
// the send step against a mailer that accepts instantly (so SMTP is not timed).
//   npx tsx scripts/bench-notices.ts        (also part of `npm run bench`)
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { realpathSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { migrateToLatest, openDatabase, rawHandle, type DB } from '../src/lib/server/db/connect';
import { findNoticeItems } from '../src/lib/server/notices/find';
import { listNoticeRecipients, writeOutbox } from '../src/lib/server/notices/outbox';
import { sendPending } from '../src/lib/server/notices/send';

const DIES = 10_000;
const TARGET_MS = 1000;
const NOW = '2026-03-02T06:00:00.000Z';
const DAY = 86_400_000;

interface Figure {
	figure: string;
	value: number;
	unit: string;
	target: string;
	pass: boolean;
	ratio?: number;
}

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

export async function run(): Promise<Figure[]> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-bench-notices-'));
	const db = openDatabase(path.join(dir, 'bench.db'));
	try {
		await migrateToLatest(db);
		await seedFleet(db);
		const job = async () => {
			const items = await findNoticeItems(db, NOW, 0.9);
			const recipients = await listNoticeRecipients(db);
			const written = await writeOutbox(db, items, recipients, NOW);
			return { items: items.length, ...written };
		};
		const first = await time(job);
		const repeat = await time(job);
		const noop = { send: async () => ({ messageId: '<bench@localhost>' }) };
		const send = await time(() => sendPending(db, noop, NOW, { origin: 'http://localhost' }));
		console.log(
			`  ${DIES} dies, ${DIES * 4} tasks: ${first.result.items} items standing, ` +
				`${first.result.notices} written (${first.result.deliveries} deliveries); ` +
				`repeat run wrote ${repeat.result.notices}; ${send.result.digests} digests of ${send.result.sent} rows`
		);
		console.log(
			`  CPU time: first ${first.cpuMs.toFixed(0)} ms, repeat ${repeat.cpuMs.toFixed(0)} ms, ` +
				`send ${send.cpuMs.toFixed(0)} ms (wall time is the figure; on a busy machine it runs higher)`
		);
		const whole = first.ms + send.ms;
		const figure = (name: string, ms: number): Figure => ({
			figure: name,
			value: ms,
			unit: 'ms',
			target: `< ${TARGET_MS} ms`,
			pass: ms < TARGET_MS,
			ratio: ms / TARGET_MS
		});
		return [
			figure('notices: first run, find + write (10 000 dies)', first.ms),
			figure('notices: repeat run, find + write (nothing new)', repeat.ms),
			figure('notices: send step, no-op mailer (claim, compose, mark)', send.ms),
			figure('notices: whole first run (find + write + send)', whole)
		];
	} finally {
		await db.destroy();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

function isEntryPoint(): boolean {
	const script = process.argv[1];
	if (!script) return false;
	try {
		return realpathSync(script) === realpathSync(fileURLToPath(import.meta.url));
	} catch {
		return false;
	}
}

if (isEntryPoint()) {
	for (const f of await run()) {
		console.log(
			`${f.figure}: ${f.value.toFixed(1)} ${f.unit} (target ${f.target}) ${f.pass ? 'pass' : 'FAIL'}`
		);
	}
}
