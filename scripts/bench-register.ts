// Page loads against a big ledger: 2 000 dies and 5 000 000 shot entries in a temporary file
// database (generated with plain SQL, with shot_daily, die and half totals filled to agree with
// the ledger). Times the register page's load (listDies + owner filter), the die page's loads
// (header: findDie + dieLife; overview: getDieStory; shots tab: getDieShotsView, which draws on
// cumulativeShotSeries), the shot ledger list (keyset pages, filters) and the press-run look-up,
// each for many random dies and pages; prints p50/p95. The same loads at 1 000 000 entries show
// that no load grows with the ledger.
//   npx tsx scripts/bench-register.ts            (also part of `npm run bench`)
//   BENCH_ROWS=2000000 npx tsx scripts/bench-register.ts   (a smaller big database)
import { runWhenCalledDirectly, type BenchFigure } from './lib/bench-report';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { migrateToLatest, openDatabase, rawHandle, type DB } from '../src/lib/server/db/connect';
import { dieListQuerySchema } from '../src/lib/schemas/die';
import { shotListQuerySchema } from '../src/lib/schemas/shots';
import { dieLife, findDie, getDieStory } from '../src/lib/server/dies/die-detail';
import { listDies, listOwnerOptions } from '../src/lib/server/dies/register';
import { getDieShotsView } from '../src/lib/server/shots/die-shots';
import { findDieShotSummary } from '../src/lib/server/shots/die-summary';
import { listPresses, listShotEntries } from '../src/lib/server/shots/ledger-list';

export const BENCH_DIES = 2000;
const BIG_ROWS = Number(process.env.BENCH_ROWS ?? 5_000_000);
const SMALL_ROWS = 1_000_000;
const TARGET_MS = 50;
const RUNS = 300;
/** The ledger spans three years before this instant. */
const NOW = '2027-03-01T08:00:00.000Z';
const SPAN_MS = 3 * 365 * 86_400_000;

/** Small deterministic generator, so every run times the same plant and the same requests. */
export function random(seed: number) {
	let s = seed >>> 0;
	return () => {
		s = (Math.imul(s, 1_664_525) + 1_013_904_223) >>> 0;
		return s / 2 ** 32;
	};
}

const PRESSES = [
	['HC-08', 'hot', 785],
	['HC-20', 'hot', 1961],
	['HC-42M', 'hot', 4119],
	['CC-40', 'cold', 3923],
	['CC-84', 'cold', 8238],
	['CC-160', 'cold', 15691],
	['CC-25B', 'cold', 2452]
] as const;

/**
 * Owners, presses, users, `dies` dies (D-00001 …) with both halves and a service plan from the
 * family templates, in one transaction. Die ids are 1…dies on a fresh database.
 */
export function createBenchPlant(
	db: DB,
	dies = BENCH_DIES,
	createdAt = '2024-01-01T00:00:00.000Z'
) {
	const raw = rawHandle(db);
	const rand = random(11);
	const alloys = raw.prepare('select id, family from alloys order by id').all() as {
		id: number;
		family: string;
	}[];
	const templates = raw
		.prepare('select family, kind, interval_shots, interval_days from service_templates')
		.all() as {
		family: string;
		kind: string;
		interval_shots: number | null;
		interval_days: number | null;
	}[];
	raw.transaction(() => {
		const customer = raw.prepare('insert into customers (code, name) values (?, ?)');
		for (let c = 1; c <= 20; c++)
			customer.run(`OWN${String(c).padStart(2, '0')}`, `Bench owner ${c}`);
		const press = raw.prepare(
			'insert into machines (name, chamber, clamp_force_kn) values (?, ?, ?)'
		);
		for (const p of PRESSES) press.run(...p);
		raw
			.prepare(
				`insert into users (id, email, name, role, customer_id, password_hash)
				 values ('bench-lead', 'lead@bench.test', 'Bench lead', 'toolroom_lead', null, 'x')`
			)
			.run();
		const die = raw.prepare(
			`insert into dies (number, part_name, part_number, customer_id, alloy_id, process, cavities,
			   projected_area_cm2, has_slides, status, created_at, updated_at)
			 values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`
		);
		const half = raw.prepare(
			`insert into die_halves (die_id, side, serial, steel, hardness_hrc, installed_at)
			 values (?, ?, ?, 'H13', 46, ?)`
		);
		const task = raw.prepare(
			`insert into service_tasks (die_id, kind, interval_shots, interval_days, last_done_at, last_done_shots)
			 values (?, ?, ?, ?, ?, 0)`
		);
		for (let i = 1; i <= dies; i++) {
			const alloy = alloys[i % alloys.length];
			const hot = alloy.family === 'zinc' || alloy.family === 'magnesium';
			const number = `D-${String(i).padStart(5, '0')}`;
			const status = i % 23 === 0 ? 'retired' : i % 7 === 0 ? 'running' : 'ready';
			const id = Number(
				die.run(
					number,
					`Bench part ${i}`,
					`BP-${i}`,
					1 + (i % 20),
					alloy.id,
					hot ? 'hot_chamber' : 'cold_chamber',
					1 + (i % 4),
					100 + Math.round(rand() * 900),
					i % 3 === 0 ? 1 : 0,
					status,
					createdAt,
					createdAt
				).lastInsertRowid
			);
			half.run(id, 'cover', `${number}-C1`, createdAt);
			half.run(id, 'ejector', `${number}-E1`, createdAt);
			for (const t of templates.filter((x) => x.family === alloy.family)) {
				task.run(id, t.kind, t.interval_shots, t.interval_days, createdAt);
			}
		}
	})();
}

/**
 * `rows` ledger entries over three years, in time order, spread over every die, written with one
 * recursive-CTE insert (indexes dropped first and rebuilt after, as a bulk load would), then the
 * daily roll-up and the die and half totals derived from them so everything agrees.
 */
export function fillLedger(db: DB, rows: number, dies: number) {
	const raw = rawHandle(db);
	// A bulk load into a throw-away file: no journal, no syncs.
	raw.pragma('journal_mode = OFF');
	raw.pragma('synchronous = OFF');
	raw.pragma('cache_size = -262144');
	const indexes = raw
		.prepare(
			`select name, sql from sqlite_master where type = 'index' and tbl_name = 'shot_entries' and sql is not null`
		)
		.all() as { name: string; sql: string }[];
	for (const i of indexes) raw.exec(`drop index ${i.name}`);
	const slots = Math.ceil(rows / dies);
	const start = Math.floor((Date.parse(NOW) - SPAN_MS) / 1000);
	const step = Math.floor(SPAN_MS / 1000 / slots);
	raw.transaction(() => {
		raw
			.prepare(
				`with recursive seq(i) as (select 0 union all select i + 1 from seq where i < ? - 1)
				 insert into shot_entries (die_id, machine_id, counted_at, shots, source, created_at)
				 select (i % ?) + 1, (i % 7) + 1,
				        strftime('%Y-%m-%dT%H:%M:%fZ', ? + (i / ?) * ? + (i % ?) * 3, 'unixepoch'),
				        20 + (abs(random()) % 400),
				        case when i % 50 = 0 then 'api' when i % 31 = 0 then 'manual' else 'csv' end,
				        ?
				   from seq`
			)
			.run(rows, dies, start, dies, step, dies, NOW);
		raw.exec(
			`insert into shot_daily (die_id, day, shots)
			 select die_id, substr(counted_at, 1, 10), sum(shots) from shot_entries group by 1, 2`
		);
		raw.exec(
			`update dies set
			   total_shots = coalesce((select sum(shots) from shot_daily d where d.die_id = dies.id), 0)`
		);
		raw.exec(
			`update die_halves set shots = (select total_shots from dies where dies.id = die_halves.die_id)`
		);
	})();
	for (const i of indexes) raw.exec(i.sql);
	raw.exec(
		`update dies set last_counted_at = (select max(counted_at) from shot_entries e where e.die_id = dies.id)`
	);
	if (process.env.BENCH_ANALYZE === '1') raw.exec('analyze');
	raw.pragma('synchronous = NORMAL');
	raw.pragma('journal_mode = WAL');
}

function percentile(sorted: number[], p: number) {
	return sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))];
}

async function time(runs: number, fn: (i: number) => Promise<unknown>) {
	for (let i = 0; i < 10; i++) await fn(i); // warm statement caches
	const ms: number[] = [];
	for (let i = 0; i < runs; i++) {
		const t = performance.now();
		await fn(i);
		ms.push(performance.now() - t);
	}
	ms.sort((a, b) => a - b);
	return { p50: percentile(ms, 0.5), p95: percentile(ms, 0.95) };
}

type Timings = Record<string, { p50: number; p95: number }>;

async function timeLoads(db: DB, dies: number): Promise<Timings> {
	const rand = random(99);
	const dieNumber = () => `D-${String(1 + Math.floor(rand() * dies)).padStart(5, '0')}`;
	const sorts = ['number', 'shots', 'life', 'owner', 'status'];
	const registerQuery = () =>
		dieListQuerySchema.parse({
			page: String(1 + Math.floor(rand() * 40)),
			sort: sorts[Math.floor(rand() * sorts.length)],
			dir: rand() < 0.5 ? 'asc' : 'desc',
			...(rand() < 0.2 ? { q: 'part 1' } : {}),
			...(rand() < 0.2 ? { status: 'running' } : {})
		});
	const out: Timings = {};
	out.register = await time(RUNS, () =>
		Promise.all([
			listDies(db, registerQuery(), { customerId: null }, NOW),
			listOwnerOptions(db, { customerId: null })
		])
	);
	out.dieOverview = await time(RUNS, async () => {
		const die = await findDie(db, dieNumber(), { customerId: null });
		if (!die) throw new Error('bench die missing');
		await Promise.all([dieLife(db, die, NOW), getDieStory(db, die, NOW)]);
	});
	out.dieShotsTab = await time(RUNS, async () => {
		const die = await findDie(db, dieNumber(), { customerId: null });
		if (!die) throw new Error('bench die missing');
		await Promise.all([dieLife(db, die, NOW), getDieShotsView(db, die)]);
	});
	// The ledger list: the newest page, a deep keyset page, and each filter on its own.
	const cursors: string[] = [];
	let page = await listShotEntries(db, shotListQuerySchema.parse({}));
	for (let i = 0; i < 200 && page.olderCursor; i++) {
		cursors.push(page.olderCursor);
		page = await listShotEntries(db, shotListQuerySchema.parse({ before: page.olderCursor }));
	}
	const sources = ['api', 'manual', 'csv', 'correction'];
	const day = (offsetDays: number) =>
		new Date(Date.parse(NOW) - offsetDays * 86_400_000).toISOString().slice(0, 10);
	out.ledgerList = await time(RUNS, (i) => {
		const pick = i % 6;
		const filters: Record<string, string> =
			pick === 0
				? {}
				: pick === 1
					? { before: cursors[Math.floor(rand() * cursors.length)] }
					: pick === 2
						? { q: dieNumber() }
						: pick === 3
							? { source: sources[Math.floor(rand() * sources.length)] }
							: pick === 4
								? { press: PRESSES[Math.floor(rand() * PRESSES.length)][0] }
								: { from: day(400), to: day(390), q: 'D-001' };
		return Promise.all([listShotEntries(db, shotListQuerySchema.parse(filters)), listPresses(db)]);
	});
	out.pressRunLookup = await time(RUNS, () => findDieShotSummary(db, dieNumber()));
	return out;
}

async function buildAndTime(rows: number): Promise<{ timings: Timings; seconds: number }> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-bench-register-'));
	const db = openDatabase(path.join(dir, 'bench.db'));
	try {
		const t0 = performance.now();
		await migrateToLatest(db);
		createBenchPlant(db, BENCH_DIES);
		fillLedger(db, rows, BENCH_DIES);
		const seconds = (performance.now() - t0) / 1000;
		console.log(
			`  ${rows.toLocaleString('en-GB')} entries, ${BENCH_DIES} dies generated in ${seconds.toFixed(1)} s`
		);
		return { timings: await timeLoads(db, BENCH_DIES), seconds };
	} finally {
		await db.destroy();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

const LOAD_NAMES: Record<string, string> = {
	register: 'register page load',
	dieOverview: 'die page load (header + overview)',
	dieShotsTab: 'die shots tab load (chart, months, halves)',
	ledgerList: 'shot ledger list load',
	pressRunLookup: 'press-run die look-up'
};

export async function run(): Promise<BenchFigure[]> {
	const big = await buildAndTime(BIG_ROWS);
	const small = await buildAndTime(SMALL_ROWS);
	const figures: BenchFigure[] = [];
	const bigLabel = `${(BIG_ROWS / 1e6).toLocaleString('en-GB')}M`;
	for (const [key, name] of Object.entries(LOAD_NAMES)) {
		const b = big.timings[key];
		const s = small.timings[key];
		figures.push(
			{
				figure: `${name} p50, ${bigLabel} rows`,
				value: b.p50,
				unit: 'ms',
				target: `< ${TARGET_MS} ms`,
				pass: b.p50 < TARGET_MS
			},
			{
				figure: `${name} p95, ${bigLabel} rows`,
				value: b.p95,
				unit: 'ms',
				target: `< ${TARGET_MS} ms`,
				pass: b.p95 < TARGET_MS
			},
			{
				figure: `${name} p95, 1M rows`,
				value: s.p95,
				unit: 'ms',
				target: `< ${TARGET_MS} ms`,
				pass: s.p95 < TARGET_MS
			},
			{
				// Small absolute times are noisy; grow means worse than 2× and more than 5 ms slower.
				figure: `${name} p95 growth 1M → ${bigLabel}`,
				value: b.p95 / s.p95,
				unit: '×',
				target: 'flat (< 2× or < 5 ms more)',
				pass: b.p95 / s.p95 < 2 || b.p95 - s.p95 < 5,
				ratio: b.p95 / s.p95
			}
		);
	}
	figures.push({
		figure: `generation of ${bigLabel} entries`,
		value: big.seconds,
		unit: 's',
		target: '< 120 s',
		pass: big.seconds < 120
	});
	return figures;
}

await runWhenCalledDirectly(import.meta.url, run);
