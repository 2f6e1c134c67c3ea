// Shot ingest through the API handler path against raw inserts. 200 000 readings in batches of
// 1000, each batch as a press-counter gateway would post it (20 dies × 50 readings, 10 minutes
// apart, each with its key): the batch text is parsed as the route does, the bearer token looked
// up, and the body handed to ingestShotBody (schema check, ledger checks, ledger rows, daily
// roll-up, die and half totals — one transaction per batch). The same rows then go into a second
// fresh database with plain better-sqlite3 inserts in one transaction. Prints both rates and the
// ratio; the target is the API path at ≥ 0.5 of the raw rate.
// With BENCH_DATABASE_URL set, the same batches also go through the same API handler path into a
// fresh schema of that PostgreSQL database, and the same rows as multi-row INSERTs (one per batch,
// one transaction) straight through `pg` into a second schema; both schemas are dropped after.
// BENCH_PG_ROUNDS rounds (default 1) on PostgreSQL; BENCH_SKIP_SQLITE=1 leaves SQLite out.
//   npx tsx scripts/bench-ingest.ts              (also part of `npm run bench`)
//   BENCH_DATABASE_URL=postgres://… BENCH_SKIP_SQLITE=1 npx tsx scripts/bench-ingest.ts
import { runWhenCalledDirectly, type BenchFigure } from './lib/bench-report';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { sql } from 'kysely';
import {
	migrateToLatest,
	openDatabase,
	poolOf,
	rawHandle,
	type DB
} from '../src/lib/server/db/connect';
import { createApiToken, findActiveToken } from '../src/lib/server/auth/tokens';
import { ingestShotBody } from '../src/lib/server/shots/api-ingest';
import { BENCH_DIES, createBenchPlant, random } from './bench-register';
import {
	benchDatabaseUrl,
	openBenchSchema,
	postgresFailed,
	skipSqlite
} from './lib/bench-postgres';

const ENTRIES = 200_000;
const BATCH = 1000;
const DIES_PER_BATCH = 20;
const STEP_MS = 10 * 60_000;
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 3);
// One round by default on PostgreSQL: its API path takes minutes a round while the ledger writes
// entry by entry (one round trip each), where SQLite's takes seconds.
const PG_ROUNDS = Number(process.env.BENCH_PG_ROUNDS ?? 1);
const NOW = '2027-03-01T08:00:00.000Z';

interface Entry {
	die: string;
	shots: number;
	countedAt: string;
	machine: string;
	key: string;
}

/** The batches as JSON text, in the order a fleet of gateways would post them. */
function makeBatches(dies: { number: string; hot: boolean }[]): string[] {
	const rand = random(5);
	const clock = new Map<string, number>();
	const start = Date.parse(NOW) - 30 * 86_400_000;
	const groups = Math.floor(dies.length / DIES_PER_BATCH);
	const perDie = BATCH / DIES_PER_BATCH;
	const batches: string[] = [];
	for (let b = 0; b < ENTRIES / BATCH; b++) {
		const group = dies.slice((b % groups) * DIES_PER_BATCH, ((b % groups) + 1) * DIES_PER_BATCH);
		const entries: Entry[] = [];
		for (let r = 0; r < perDie; r++) {
			for (const d of group) {
				const t = (clock.get(d.number) ?? start) + STEP_MS;
				clock.set(d.number, t);
				entries.push({
					die: d.number,
					shots: 20 + Math.floor(rand() * 40),
					countedAt: new Date(t).toISOString(),
					machine: d.hot ? 'HC-08' : 'CC-84',
					key: `gw-${d.number}-${t}`
				});
			}
		}
		batches.push(JSON.stringify(entries));
	}
	return batches;
}

const cpuSeconds = (u: NodeJS.CpuUsage) => (u.user + u.system) / 1e6;

interface Timed {
	seconds: number;
	/** CPU time of this process (on PostgreSQL the server's own work is not in it). */
	cpu: number;
}

async function timed(work: () => Promise<void> | void): Promise<Timed> {
	const t0 = performance.now();
	const c0 = process.cpuUsage();
	await work();
	return { seconds: (performance.now() - t0) / 1000, cpu: cpuSeconds(process.cpuUsage(c0)) };
}

async function benchDies(db: DB) {
	const dies = await db
		.selectFrom('dies')
		.select(['number', 'process'])
		.where('status', '!=', 'retired')
		.orderBy('id')
		.execute();
	return dies.map((d) => ({ number: d.number, hot: d.process === 'hot_chamber' }));
}

/** The API handler path, batch by batch: parse, authorise, validate, count. */
async function ingestThroughApi(db: DB, batches: string[]): Promise<Timed> {
	const { token } = await createApiToken(db, {
		name: 'bench gateway',
		scopes: ['shots:write'],
		customerId: null,
		createdBy: null
	});
	let accepted = 0;
	const spent = await timed(async () => {
		for (const text of batches) {
			const principal = await findActiveToken(db, token);
			if (!principal) throw new Error('bench token not found');
			const answer = await ingestShotBody(
				db,
				JSON.parse(text),
				{ userId: null, tokenId: principal.tokenId, customerId: principal.customerId },
				NOW
			);
			if (answer.status !== 201 || !('accepted' in answer.body)) {
				throw new Error(`bench batch refused: ${JSON.stringify(answer.body).slice(0, 400)}`);
			}
			accepted += answer.body.accepted;
		}
	});
	// The API path's totals must agree with its ledger, or the rate means nothing.
	const { rows } = await sql<{ ledger: number; dies: number; daily: number }>`
		select (select sum(shots) from shot_entries) as ledger, (select sum(total_shots) from dies) as dies,
		       (select sum(shots) from shot_daily) as daily`.execute(db);
	const check = rows[0];
	if (accepted !== ENTRIES || check.ledger !== check.dies || check.ledger !== check.daily) {
		throw new Error(`bench totals disagree: ${accepted} accepted, ${JSON.stringify(check)}`);
	}
	return spent;
}

/** The die and press ids by name, for the raw writers. */
async function idsByName(db: DB) {
	const dies = await db.selectFrom('dies').select(['id', 'number']).execute();
	const presses = await db.selectFrom('machines').select(['id', 'name']).execute();
	return {
		die: new Map(dies.map((d) => [d.number, d.id])),
		press: new Map(presses.map((m) => [m.name, m.id]))
	};
}

/** SQLite reference: one prepared single-row insert per entry, all in one transaction. */
async function insertRawSqlite(db: DB, batches: string[]): Promise<Timed> {
	const ids = await idsByName(db);
	const raw = rawHandle(db);
	const rows = batches.flatMap((text) => JSON.parse(text) as Entry[]);
	const insert = raw.prepare(
		`insert into shot_entries (die_id, machine_id, counted_at, shots, source, idem_key, created_at)
		 values (?, ?, ?, ?, 'api', ?, ?)`
	);
	return timed(() =>
		raw.transaction(() => {
			for (const r of rows) {
				insert.run(ids.die.get(r.die), ids.press.get(r.machine), r.countedAt, r.shots, r.key, NOW);
			}
		})()
	);
}

/** PostgreSQL reference: one multi-row INSERT per batch straight through `pg`, one transaction. */
async function insertRawPostgres(db: DB, batches: string[]): Promise<Timed> {
	const ids = await idsByName(db);
	const pool = poolOf(db);
	if (!pool) throw new Error('not a PostgreSQL bench database');
	const parsed = batches.map((text) => JSON.parse(text) as Entry[]);
	const client = await pool.connect();
	try {
		return await timed(async () => {
			await client.query('begin');
			for (const rows of parsed) {
				const values: unknown[] = [];
				const tuples = rows.map((r, k) => {
					values.push(ids.die.get(r.die), ids.press.get(r.machine), r.countedAt, r.shots, r.key);
					const n = k * 5;
					return `($${n + 1}, $${n + 2}, $${n + 3}, $${n + 4}, 'api', $${n + 5}, '${NOW}')`;
				});
				await client.query(
					`insert into shot_entries (die_id, machine_id, counted_at, shots, source, idem_key, created_at)
					 values ${tuples.join(', ')}`,
					values
				);
			}
			await client.query('commit');
		});
	} catch (err) {
		await client.query('rollback').catch(() => undefined);
		throw err;
	} finally {
		client.release();
	}
}

interface Round {
	apiSeconds: number;
	apiCpu: number;
	rawSeconds: number;
	rawCpu: number;
}

/** Two fresh plant databases of one engine (one per path), dropped again after the round. */
interface BenchEngine {
	name: string;
	open: (label: string) => Promise<{ db: DB; close: () => Promise<void> }>;
	insertRaw: (db: DB, batches: string[]) => Promise<Timed>;
}

const sqliteEngine: BenchEngine = {
	name: 'SQLite',
	open: async (label) => {
		const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-bench-ingest-'));
		const db = openDatabase(path.join(dir, `${label}.db`));
		const close = async () => {
			await db.destroy();
			fs.rmSync(dir, { recursive: true, force: true });
		};
		try {
			await migrateToLatest(db);
		} catch (err) {
			await close();
			throw err;
		}
		return { db, close };
	},
	insertRaw: insertRawSqlite
};

const postgresEngine = (url: string): BenchEngine => ({
	name: 'PostgreSQL',
	open: async (label) => {
		const bench = await openBenchSchema(url, `ingest_${label}`);
		return { db: bench.db, close: bench.drop };
	},
	insertRaw: insertRawPostgres
});

/**
 * One round on two fresh databases of the engine, one after the other: the API handler path
 * first, then raw inserts of the same rows. Only one bench database exists at a time.
 */
async function runRound(engine: BenchEngine): Promise<Round> {
	let batches: string[];
	const api = await engine.open('api');
	let a: Timed;
	try {
		await createBenchPlant(api.db, BENCH_DIES);
		batches = makeBatches(await benchDies(api.db));
		a = await ingestThroughApi(api.db, batches);
	} finally {
		await api.close();
	}
	const raw = await engine.open('raw');
	try {
		await createBenchPlant(raw.db, BENCH_DIES);
		const r = await engine.insertRaw(raw.db, batches);
		return { apiSeconds: a.seconds, apiCpu: a.cpu, rawSeconds: r.seconds, rawCpu: r.cpu };
	} finally {
		await raw.close();
	}
}

/** Best of the rounds per path: other processes on a shared machine only ever make a run slower. */
async function measure(engine: BenchEngine, count: number) {
	const rounds: Round[] = [];
	for (let i = 0; i < count; i++) {
		const r = await runRound(engine);
		rounds.push(r);
		console.log(
			`  ${engine.name} round ${i + 1}: API path ${r.apiSeconds.toFixed(2)} s (CPU ${r.apiCpu.toFixed(2)} s), raw ${r.rawSeconds.toFixed(2)} s (CPU ${r.rawCpu.toFixed(2)} s); load average ${os.loadavg()[0].toFixed(1)}`
		);
	}
	const best = (k: keyof Round) => Math.min(...rounds.map((r) => r[k]));
	const apiRate = ENTRIES / best('apiSeconds');
	const rawRate = ENTRIES / best('rawSeconds');
	const ratio = apiRate / rawRate;
	const cpuRatio = best('rawCpu') / best('apiCpu');
	console.log(
		`  ${engine.name}: API path ${Math.round(apiRate).toLocaleString('en-GB')} entries/s, raw inserts ${Math.round(rawRate).toLocaleString('en-GB')} entries/s, ratio ${ratio.toFixed(2)} (by CPU time ${cpuRatio.toFixed(2)})`
	);
	return { apiRate, rawRate, ratio, cpuRatio };
}

export async function run(): Promise<BenchFigure[]> {
	const figures: BenchFigure[] = [];
	if (!skipSqlite()) {
		const m = await measure(sqliteEngine, ROUNDS);
		figures.push(
			{
				figure: 'ingest via API handler path',
				value: m.apiRate,
				unit: 'entries/s',
				target: 'info',
				pass: true
			},
			{
				figure: 'ingest via raw inserts',
				value: m.rawRate,
				unit: 'entries/s',
				target: 'info',
				pass: true
			},
			{
				figure: 'ingest API / raw rate',
				value: m.ratio,
				unit: '×',
				target: '≥ 0.5',
				pass: m.ratio >= 0.5,
				ratio: m.ratio
			},
			{
				figure: 'ingest API / raw, by CPU time',
				value: m.cpuRatio,
				unit: '×',
				target: '≥ 0.5',
				pass: m.cpuRatio >= 0.5,
				ratio: m.cpuRatio
			}
		);
	}
	const url = benchDatabaseUrl();
	if (url) {
		// No ratio by CPU time here: on PostgreSQL most of the work is the server's, not this process's.
		const m = await measure(postgresEngine(url), PG_ROUNDS).catch((err: unknown) => {
			figures.push(postgresFailed('ingest', err));
			return null;
		});
		if (!m) return figures;
		figures.push(
			{
				figure: 'ingest via API handler path, PostgreSQL',
				value: m.apiRate,
				unit: 'entries/s',
				target: 'info',
				pass: true
			},
			{
				figure: 'ingest via raw multi-row INSERT, PostgreSQL',
				value: m.rawRate,
				unit: 'entries/s',
				target: 'info',
				pass: true
			},
			{
				figure: 'ingest API / raw rate, PostgreSQL',
				value: m.ratio,
				unit: '×',
				target: '≥ 0.5',
				pass: m.ratio >= 0.5,
				ratio: m.ratio
			}
		);
	}
	return figures;
}

await runWhenCalledDirectly(import.meta.url, run);
