// Page loads against a big ledger: 2 000 dies and 5 000 000 shot entries in a temporary file
// database (generated with plain SQL, with shot_daily, die and half totals filled to agree with
// the ledger). Times the register page's load (listDies + owner filter), the die page's loads
// (header: findDie + dieLife; overview: getDieStory; shots tab: getDieShotsView, which draws on
// cumulativeShotSeries), the shot ledger list (keyset pages, filters) and the press-run look-up,
// each for many random dies and pages; prints p50/p95. The same loads at 1 000 000 entries show
// that no load grows with the ledger.
// With BENCH_DATABASE_URL set, the same plant and big ledger are also built in a schema of their
// own in that PostgreSQL database (dropped afterwards) and the same loads timed there, printed
// beside the SQLite figures with the PostgreSQL / SQLite ratio of each p95 (about five minutes
// more on two shared cores, four of them building the ledger).
//   npx tsx scripts/bench-register.ts            (also part of `npm run bench`)
//   BENCH_ROWS=2000000 npx tsx scripts/bench-register.ts   (a smaller big database)
//   BENCH_DATABASE_URL=postgres://… BENCH_SKIP_SQLITE=1 npx tsx scripts/bench-register.ts
import { runWhenCalledDirectly, type BenchFigure } from './lib/bench-report';
import { fillLedgerPostgres, fillLedgerSqlite, LEDGER_NOW } from './lib/bench-ledger';
import {
	benchDatabaseUrl,
	openBenchSchema,
	postgresFailed,
	settleAfterBulkLoad,
	skipSqlite
} from './lib/bench-postgres';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { migrateToLatest, openDatabase, type DB } from '../src/lib/server/db/connect';
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
const NOW = LEDGER_NOW;

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

/** Rows per multi-row insert: well inside both engines' limits on bound parameters. */
const CHUNK = 500;

/**
 * Owners, presses, users, `dies` dies (D-00001 …) with both halves and a service plan from the
 * family templates, in one transaction, through Kysely so the same plant is built on either
 * engine. Die ids are 1…dies on a fresh database.
 */
export async function createBenchPlant(
	db: DB,
	dies = BENCH_DIES,
	createdAt = '2024-01-01T00:00:00.000Z'
) {
	const rand = random(11);
	const alloys = await db.selectFrom('alloys').select(['id', 'family']).orderBy('id').execute();
	const templates = await db
		.selectFrom('service_templates')
		.select(['family', 'kind', 'interval_shots', 'interval_days'])
		.orderBy('id')
		.execute();
	await db.transaction().execute(async (tx) => {
		await tx
			.insertInto('customers')
			.values(
				Array.from({ length: 20 }, (_, c) => ({
					code: `OWN${String(c + 1).padStart(2, '0')}`,
					name: `Bench owner ${c + 1}`
				}))
			)
			.execute();
		await tx
			.insertInto('machines')
			.values(PRESSES.map(([name, chamber, kn]) => ({ name, chamber, clamp_force_kn: kn })))
			.execute();
		await tx
			.insertInto('users')
			.values({
				id: 'bench-lead',
				email: 'lead@bench.test',
				name: 'Bench lead',
				role: 'toolroom_lead',
				customer_id: null,
				password_hash: 'x'
			})
			.execute();
		for (let first = 1; first <= dies; first += CHUNK) {
			const chunk = Array.from({ length: Math.min(CHUNK, dies - first + 1) }, (_, k) => {
				const i = first + k;
				const alloy = alloys[i % alloys.length];
				const hot = alloy.family === 'zinc' || alloy.family === 'magnesium';
				return { i, alloy, hot, number: `D-${String(i).padStart(5, '0')}` };
			});
			const ids = await tx
				.insertInto('dies')
				.values(
					chunk.map(({ i, alloy, hot, number }) => ({
						number,
						part_name: `Bench part ${i}`,
						part_number: `BP-${i}`,
						customer_id: 1 + (i % 20),
						alloy_id: alloy.id,
						process: hot ? ('hot_chamber' as const) : ('cold_chamber' as const),
						cavities: 1 + (i % 4),
						projected_area_cm2: 100 + Math.round(rand() * 900),
						has_slides: i % 3 === 0 ? 1 : 0,
						status: i % 23 === 0 ? ('retired' as const) : i % 7 === 0 ? 'running' : 'ready',
						created_at: createdAt,
						updated_at: createdAt
					}))
				)
				.returning('id')
				.execute();
			await tx
				.insertInto('die_halves')
				.values(
					chunk.flatMap(({ number }, k) =>
						(['cover', 'ejector'] as const).map((side) => ({
							die_id: ids[k].id,
							side,
							serial: `${number}-${side === 'cover' ? 'C' : 'E'}1`,
							steel: 'H13',
							hardness_hrc: 46,
							installed_at: createdAt
						}))
					)
				)
				.execute();
			const tasks = chunk.flatMap(({ alloy }, k) =>
				templates
					.filter((t) => t.family === alloy.family)
					.map((t) => ({
						die_id: ids[k].id,
						kind: t.kind,
						interval_shots: t.interval_shots,
						interval_days: t.interval_days,
						last_done_at: createdAt,
						last_done_shots: 0
					}))
			);
			if (tasks.length > 0) await tx.insertInto('service_tasks').values(tasks).execute();
		}
	});
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

interface Timing {
	p50: number;
	p95: number;
}
/** Each load's timing, or why it could not run (a load not yet working on an engine). */
type Timings = Record<keyof typeof LOAD_NAMES, Timing | { error: string }>;

const LOAD_NAMES = {
	register: 'register page load',
	dieOverview: 'die page load (header + overview)',
	dieShotsTab: 'die shots tab load (chart, months, halves)',
	ledgerList: 'shot ledger list load',
	pressRunLookup: 'press-run die look-up'
};

async function timeLoad(key: keyof typeof LOAD_NAMES, measure: () => Promise<Timing>) {
	try {
		return await measure();
	} catch (err) {
		const error = err instanceof Error ? err.message : String(err);
		console.log(`  ${LOAD_NAMES[key]} failed: ${error}`);
		return { error };
	}
}

/** The page loads, each many times with random dies, pages, sorts and filters. */
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
	const register = await timeLoad('register', () =>
		time(RUNS, () =>
			Promise.all([
				listDies(db, registerQuery(), { customerId: null }, NOW),
				listOwnerOptions(db, { customerId: null })
			])
		)
	);
	const dieOverview = await timeLoad('dieOverview', () =>
		time(RUNS, async () => {
			const die = await findDie(db, dieNumber(), { customerId: null });
			if (!die) throw new Error('bench die missing');
			await Promise.all([dieLife(db, die, NOW), getDieStory(db, die, NOW)]);
		})
	);
	const dieShotsTab = await timeLoad('dieShotsTab', () =>
		time(RUNS, async () => {
			const die = await findDie(db, dieNumber(), { customerId: null });
			if (!die) throw new Error('bench die missing');
			await Promise.all([dieLife(db, die, NOW), getDieShotsView(db, die)]);
		})
	);
	const ledgerList = await timeLoad('ledgerList', async () => {
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
		return time(RUNS, (i) => {
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
			return Promise.all([
				listShotEntries(db, shotListQuerySchema.parse(filters)),
				listPresses(db)
			]);
		});
	});
	const pressRunLookup = await timeLoad('pressRunLookup', () =>
		time(RUNS, () => findDieShotSummary(db, dieNumber()))
	);
	return { register, dieOverview, dieShotsTab, ledgerList, pressRunLookup };
}

interface Built {
	timings: Timings;
	/** Seconds to migrate, build the plant and fill the ledger. */
	seconds: number;
}

const describeBuild = (engine: string, rows: number, seconds: number) =>
	console.log(
		`  ${engine}: ${rows.toLocaleString('en-GB')} entries, ${BENCH_DIES} dies generated in ${seconds.toFixed(1)} s`
	);

async function buildAndTimeSqlite(rows: number): Promise<Built> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-bench-register-'));
	const db = openDatabase(path.join(dir, 'bench.db'));
	try {
		const t0 = performance.now();
		await migrateToLatest(db);
		await createBenchPlant(db, BENCH_DIES);
		fillLedgerSqlite(db, rows, BENCH_DIES);
		const seconds = (performance.now() - t0) / 1000;
		describeBuild('SQLite', rows, seconds);
		return { timings: await timeLoads(db, BENCH_DIES), seconds };
	} finally {
		await db.destroy();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

/** The same plant and ledger in a schema of its own in BENCH_DATABASE_URL, dropped afterwards. */
async function buildAndTimePostgres(url: string, rows: number): Promise<Built> {
	const t0 = performance.now();
	const bench = await openBenchSchema(url, 'register');
	try {
		await createBenchPlant(bench.db, BENCH_DIES);
		await fillLedgerPostgres(bench.db, rows, BENCH_DIES);
		await settleAfterBulkLoad(bench.db);
		const seconds = (performance.now() - t0) / 1000;
		describeBuild(`PostgreSQL (schema ${bench.schema})`, rows, seconds);
		return { timings: await timeLoads(bench.db, BENCH_DIES), seconds };
	} finally {
		await bench.drop();
	}
}

const failed = (t: Timing | { error: string }): t is { error: string } => 'error' in t;

/** p50 or p95 of one load against the page-load target; a load that failed is a failed figure. */
function loadFigure(figure: string, t: Timing | { error: string }, p: keyof Timing): BenchFigure {
	const value = failed(t) ? NaN : t[p];
	return { figure, value, unit: 'ms', target: `< ${TARGET_MS} ms`, pass: value < TARGET_MS };
}

export async function run(): Promise<BenchFigure[]> {
	const url = benchDatabaseUrl();
	const big = skipSqlite() ? null : await buildAndTimeSqlite(BIG_ROWS);
	const small = skipSqlite() ? null : await buildAndTimeSqlite(SMALL_ROWS);
	const figures: BenchFigure[] = [];
	const pg = url
		? await buildAndTimePostgres(url, BIG_ROWS).catch((err: unknown) => {
				figures.push(postgresFailed('page loads', err));
				return null;
			})
		: null;
	const bigLabel = `${(BIG_ROWS / 1e6).toLocaleString('en-GB')}M`;
	for (const [key, name] of Object.entries(LOAD_NAMES) as [keyof typeof LOAD_NAMES, string][]) {
		if (big && small) {
			const b = big.timings[key];
			const s = small.timings[key];
			figures.push(
				loadFigure(`${name} p50, ${bigLabel} rows`, b, 'p50'),
				loadFigure(`${name} p95, ${bigLabel} rows`, b, 'p95'),
				loadFigure(`${name} p95, 1M rows`, s, 'p95')
			);
			const growth = failed(b) || failed(s) ? NaN : b.p95 / s.p95;
			figures.push({
				// Small absolute times are noisy; grow means worse than 2× and more than 5 ms slower.
				figure: `${name} p95 growth 1M → ${bigLabel}`,
				value: growth,
				unit: '×',
				target: 'flat (< 2× or < 5 ms more)',
				pass: growth < 2 || (!failed(b) && !failed(s) && b.p95 - s.p95 < 5),
				ratio: growth
			});
		}
		if (pg) {
			const p = pg.timings[key];
			figures.push(
				loadFigure(`${name} p50, ${bigLabel} rows, PostgreSQL`, p, 'p50'),
				loadFigure(`${name} p95, ${bigLabel} rows, PostgreSQL`, p, 'p95')
			);
			if (big) {
				const b = big.timings[key];
				const ratio = failed(p) || failed(b) ? NaN : p.p95 / b.p95;
				figures.push({
					figure: `${name} p95 PostgreSQL / SQLite, ${bigLabel} rows`,
					value: ratio,
					unit: '×',
					target: 'info',
					pass: Number.isFinite(ratio),
					ratio
				});
			}
		}
	}
	if (big) {
		figures.push({
			figure: `generation of ${bigLabel} entries`,
			value: big.seconds,
			unit: 's',
			target: '< 120 s',
			pass: big.seconds < 120
		});
	}
	if (pg) {
		figures.push({
			figure: `generation of ${bigLabel} entries, PostgreSQL`,
			value: pg.seconds,
			unit: 's',
			target: 'info',
			pass: true
		});
	}
	return figures;
}

await runWhenCalledDirectly(import.meta.url, run);
