// Crash safety of shot ingest, one implementation for the test (small) and the bench (large):
// several clients post keyed batches of shots at once to scripts/lib/ingest-server.ts — the code
// path of POST /api/v1/shots — and retry every batch with the same keys until it is acknowledged,
// while the server is killed with SIGKILL and started again. Afterwards the database file is opened
// as a crash left it and checked: SQLite integrity, every acknowledged key exactly once, nothing
// that was never acknowledged, and die, half and daily totals equal to the ledger (and to what the
// clients sent).
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { migrateToLatest, openDatabase, rawHandle, type DB } from '../../src/lib/server/db/connect';
import { createDie } from '../../src/lib/server/dies/die-write';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const SERVER_SCRIPT = path.join(ROOT, 'scripts/lib/ingest-server.ts');
const USER_ID = 'crash-lead';
/** Few dies, so the clients fight over the same rows. Hot zinc and cold aluminium. */
const DIES = [
	{ number: 'K-0001', hot: true },
	{ number: 'K-0002', hot: true },
	{ number: 'K-0003', hot: true },
	{ number: 'K-0004', hot: false },
	{ number: 'K-0005', hot: false },
	{ number: 'K-0006', hot: false }
];
/**
 * At most this many shots per entry: the plausibility check allows a minute's worth even for
 * readings a millisecond apart, 7 shots on a cold-chamber aluminium die (400 shots/h, see
 * src/lib/server/shots/plausibility.ts), so no valid entry is refused however the clients interleave.
 */
const MAX_SHOTS = 5;
const ENTRY_STEP_MS = 60_000;
const REQUEST_TIMEOUT_MS = 20_000;
const SERVER_START_TIMEOUT_MS = 60_000;

export interface CrashOptions {
	clients: number;
	batchesPerClient: number;
	/** SIGKILLs while the clients post; the final stop is one more, not counted here. */
	kills: number;
	maxBatch?: number;
	/** Chance that a batch carries entries already acknowledged, and that a whole batch is sent again. */
	resendChance?: number;
	seed?: number;
	log?: (line: string) => void;
}

export interface CrashReport {
	clients: number;
	batches: number;
	kills: number;
	/** Kills that cut off at least one request already sent to the running server. */
	killsInterrupting: number;
	/** Kills that fell between a commit and its answer (every other one). */
	killsAfterCommit: number;
	/** The signal that ended the server at each kill: SIGKILL every time. */
	killSignals: string[];
	restartMs: number[];
	seconds: number;
	requests: number;
	networkFailures: number;
	serverErrors: number;
	/** 4xx answers: a refused valid batch is a failure of the scenario. */
	refused: string[];
	/** Acks that reported an entry as a duplicate before it had ever been acknowledged: the commit
	 * happened, the answer was lost to a kill, and the retry was recognised. */
	answersLostAfterCommit: number;
	resendsAcknowledged: number;
	/** Acknowledgements whose accepted + duplicates did not match the batch. */
	badAcknowledgements: string[];
	entriesAcknowledged: number;
	entriesInLedger: number;
	integrity: string;
	foreignKeyProblems: number;
	/** Up to 20 examples each; the counts are below. */
	keysMissing: string[];
	keysDuplicated: string[];
	keysNeverAcknowledged: string[];
	missingCount: number;
	duplicatedCount: number;
	neverAcknowledgedCount: number;
	totalsMismatches: string[];
	/** Set if the server died without being killed (an error of its own). */
	serverExitedOnItsOwn: string | null;
	serverLog: string;
}

interface Entry {
	die: string;
	shots: number;
	countedAt: string;
	machine: string;
	key: string;
}

interface Ack {
	accepted: number;
	duplicates: number;
}

/** Deterministic pseudo-random numbers in [0, 1) (mulberry32). */
function random(seed: number) {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function buildPlant(db: DB, at: string) {
	await db
		.insertInto('users')
		.values({
			id: USER_ID,
			email: 'crash-lead@plant.test',
			name: 'Crash lead',
			role: 'toolroom_lead',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	const owner = await db
		.insertInto('customers')
		.values({ code: 'CRASH', name: 'Crash test owner' })
		.returning('id')
		.executeTakeFirstOrThrow();
	await db
		.insertInto('machines')
		.values([
			{ name: 'HC-08', chamber: 'hot', clamp_force_kn: 785 },
			{ name: 'CC-84', chamber: 'cold', clamp_force_kn: 8238 }
		])
		.execute();
	const alloys = new Map(
		(await db.selectFrom('alloys').select(['id', 'code']).execute()).map((a) => [a.code, a.id])
	);
	for (const d of DIES) {
		const made = await createDie(
			db,
			{
				number: d.number,
				partName: `Crash part ${d.number}`,
				partNumber: '',
				customerId: owner.id,
				alloyId: alloys.get(d.hot ? 'ZP0400' : 'A380')!,
				process: d.hot ? 'hot_chamber' : 'cold_chamber',
				cavities: 2,
				projectedAreaCm2: 250,
				hasSlides: false,
				location: '',
				notes: '',
				expectedLifeShots: undefined,
				steel: 'H13'
			},
			USER_ID,
			at
		);
		if (!made.ok) throw new Error(`Could not create ${d.number}: ${made.message}`);
	}
}

/** Every client's batches, planned up front: unique keys, readings a minute apart across the run. */
function planBatches(
	o: { clients: number; batchesPerClient: number; maxBatch: number; seed: number },
	runId: string,
	start: number
) {
	const rand = random(o.seed);
	const plans: Entry[][][] = [];
	for (let c = 0; c < o.clients; c++) {
		const batches: Entry[][] = [];
		for (let b = 0; b < o.batchesPerClient; b++) {
			const size = 1 + Math.floor(rand() * o.maxBatch);
			const batch: Entry[] = [];
			for (let i = 0; i < size; i++) {
				const d = DIES[Math.floor(rand() * DIES.length)];
				const slot = (b * o.clients + c) * o.maxBatch + i;
				batch.push({
					die: d.number,
					shots: 1 + Math.floor(rand() * MAX_SHOTS),
					countedAt: new Date(start + slot * ENTRY_STEP_MS).toISOString(),
					machine: d.hot ? 'HC-08' : 'CC-84',
					key: `${runId}-c${c}-b${b}-e${i}`
				});
			}
			batches.push(batch);
		}
		plans.push(batches);
	}
	return plans;
}

interface Running {
	child: ChildProcess;
	port: number;
	/** True once the keeper has asked for its death; any other exit is a crash of its own. */
	killed: boolean;
}

/** `outside`: SIGKILL at whatever moment it lands. `after-commit`: the server SIGKILLs itself
 * between a commit and its answer (see ingest-server.ts). */
export type KillMode = 'outside' | 'after-commit';
/** If an armed server commits nothing for this long, it is killed from outside after all. */
const AFTER_COMMIT_WAIT_MS = 5_000;

class ServerKeeper {
	current: Running | null = null;
	/** Generation of the server that is up and answering, or null while it is down. */
	upGeneration: number | null = null;
	generation = 0;
	/** Set when the server stopped without being killed: a crash of its own, the run stops. */
	exitedOnItsOwn: string | null = null;
	private log: string[] = [];
	private listenPort = 0;

	constructor(private file: string) {}

	get port() {
		return this.listenPort;
	}

	get serverLog() {
		return this.log.slice(-40).join('\n');
	}

	/** Starts the server (on the same port as before, if it had one) and waits for `ready`. */
	async start(): Promise<void> {
		let lastError: Error | null = null;
		for (let attempt = 0; attempt < 3; attempt++) {
			try {
				// After three refusals of the old port (something else took it), any free port will do.
				const running = await this.spawnOne(attempt === 2 ? 0 : this.listenPort);
				this.current = running;
				this.listenPort = running.port;
				this.generation++;
				this.upGeneration = this.generation;
				running.child.once('exit', (code, signal) => {
					if (!running.killed) {
						this.exitedOnItsOwn = `exit ${signal ?? code}: ${this.serverLog}`;
						this.current = null;
						this.upGeneration = null;
					}
				});
				return;
			} catch (err) {
				lastError = err as Error;
			}
		}
		throw lastError ?? new Error('The ingest server did not start.');
	}

	private spawnOne(port: number): Promise<Running> {
		const child = spawn(process.execPath, ['--import', 'tsx', SERVER_SCRIPT], {
			cwd: ROOT,
			env: {
				...process.env,
				DATABASE_PATH: this.file,
				PORT: String(port),
				INGEST_USER_ID: USER_ID,
				INGEST_EXIT_WITH_PARENT: '1'
			},
			stdio: ['pipe', 'pipe', 'pipe']
		});
		// The pipe is only there to close when this process dies (see ingest-server.ts).
		child.stdin!.on('error', () => {});
		child.stderr!.setEncoding('utf8');
		child.stderr!.on('data', (text: string) => {
			this.log.push(...text.trimEnd().split('\n'));
			if (this.log.length > 200) this.log.splice(0, this.log.length - 200);
		});
		return new Promise<Running>((resolve, reject) => {
			const timer = setTimeout(() => {
				child.kill('SIGKILL');
				reject(new Error('The ingest server did not say ready in time.'));
			}, SERVER_START_TIMEOUT_MS);
			const lines = createInterface({ input: child.stdout! });
			lines.on('line', (line) => {
				const m = /^ready (\d+)$/.exec(line);
				if (m) {
					clearTimeout(timer);
					resolve({ child, port: Number(m[1]), killed: false });
				}
			});
			child.once('exit', (code, signal) => {
				clearTimeout(timer);
				reject(
					new Error(
						`The ingest server stopped before it was ready (${signal ?? code}): ${this.serverLog}`
					)
				);
			});
		});
	}

	/**
	 * SIGKILL, as a power cut or the OOM killer would; waits until the process is gone and returns
	 * the signal that ended it.
	 */
	async kill(mode: KillMode = 'outside'): Promise<string | null> {
		const running = this.current;
		if (!running) return null;
		running.killed = true;
		const { child } = running;
		const down = () => {
			this.upGeneration = null;
			this.current = null;
		};
		if (child.exitCode !== null || child.signalCode !== null) {
			down();
			return child.signalCode;
		}
		const gone = new Promise<string | null>((r) => child.once('exit', (_c, signal) => r(signal)));
		if (mode === 'after-commit') {
			// Requests go on being answered until the armed server commits, so it stays "up" till then.
			child.kill('SIGUSR2');
			const timer = setTimeout(() => child.kill('SIGKILL'), AFTER_COMMIT_WAIT_MS);
			const signal = await gone;
			clearTimeout(timer);
			down();
			return signal;
		}
		down();
		child.kill('SIGKILL');
		return gone;
	}
}

type PostResult =
	{ kind: 'answer'; status: number; body: string } | { kind: 'network'; error: string };

function post(agent: http.Agent, port: number, text: string): Promise<PostResult> {
	return new Promise((resolve) => {
		const req = http.request(
			{
				host: '127.0.0.1',
				port,
				path: '/shots',
				method: 'POST',
				agent,
				timeout: REQUEST_TIMEOUT_MS,
				headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(text) }
			},
			(res) => {
				const chunks: Buffer[] = [];
				res.on('data', (c: Buffer) => chunks.push(c));
				res.on('end', () =>
					resolve({
						kind: 'answer',
						status: res.statusCode ?? 0,
						body: Buffer.concat(chunks).toString('utf8')
					})
				);
				res.on('error', (err) => resolve({ kind: 'network', error: err.message }));
				res.on('aborted', () => resolve({ kind: 'network', error: 'response aborted' }));
			}
		);
		req.on('timeout', () => req.destroy(new Error('request timed out')));
		req.on('error', (err) => resolve({ kind: 'network', error: err.message }));
		req.end(text);
	});
}

/** Runs the whole scenario on a fresh temporary database and returns what it found. */
export async function runCrashScenario(options: CrashOptions): Promise<CrashReport> {
	const o = { maxBatch: 20, resendChance: 0.1, seed: 1, ...options };
	const log = options.log ?? (() => {});
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-crash-'));
	const file = path.join(dir, 'plant.db');
	const agent = new http.Agent({ keepAlive: false });
	const keeper = new ServerKeeper(file);
	try {
		const now = Date.now();
		const setup = openDatabase(file);
		try {
			await migrateToLatest(setup);
			await buildPlant(setup, new Date(now).toISOString());
		} finally {
			await setup.destroy();
		}
		const totalSlots = o.clients * o.batchesPerClient * o.maxBatch;
		// Readings end an hour before now (none in the future) and spread over several days, so the
		// daily roll-up has more than one row per die.
		const start = now - 3_600_000 - totalSlots * ENTRY_STEP_MS;
		const runId = `crash${now.toString(36)}`;
		const plans = planBatches(o, runId, start);
		const totalBatches = o.clients * o.batchesPerClient;

		const acked = new Map<string, Entry>();
		const interrupted = new Set<number>();
		const killed = new Set<number>();
		const report: CrashReport = {
			clients: o.clients,
			batches: totalBatches,
			kills: 0,
			killsInterrupting: 0,
			killsAfterCommit: 0,
			killSignals: [],
			restartMs: [],
			seconds: 0,
			requests: 0,
			networkFailures: 0,
			serverErrors: 0,
			refused: [],
			answersLostAfterCommit: 0,
			resendsAcknowledged: 0,
			badAcknowledgements: [],
			entriesAcknowledged: 0,
			entriesInLedger: 0,
			integrity: '',
			foreignKeyProblems: 0,
			keysMissing: [],
			keysDuplicated: [],
			keysNeverAcknowledged: [],
			missingCount: 0,
			duplicatedCount: 0,
			neverAcknowledgedCount: 0,
			totalsMismatches: [],
			serverExitedOnItsOwn: null,
			serverLog: ''
		};
		let ackedBatches = 0;
		let clientsDone = 0;
		let aborted = false;

		/** Posts until the server acknowledges (201); null if it refuses or the run is aborted. */
		async function postUntilAcknowledged(batch: Entry[]): Promise<Ack | null> {
			const text = JSON.stringify(batch);
			for (let attempt = 0; !aborted && !keeper.exitedOnItsOwn; attempt++) {
				const generation = keeper.upGeneration;
				report.requests++;
				const r = await post(agent, keeper.port, text);
				if (r.kind === 'network') {
					report.networkFailures++;
					if (generation !== null) interrupted.add(generation);
					await sleep(10 + Math.min(attempt, 10) * 10);
					continue;
				}
				if (r.status >= 500) {
					report.serverErrors++;
					await sleep(20);
					continue;
				}
				if (r.status !== 201) {
					report.refused.push(`${r.status} ${r.body.slice(0, 300)}`);
					return null;
				}
				return JSON.parse(r.body) as Ack;
			}
			return null;
		}

		function checkAck(ack: Ack, size: number, what: string) {
			if (ack.accepted + ack.duplicates !== size) {
				report.badAcknowledgements.push(
					`${what}: ${ack.accepted} accepted + ${ack.duplicates} duplicates for ${size} entries`
				);
			}
		}

		async function client(c: number) {
			const rand = random(o.seed * 1000 + c + 1);
			const done: Entry[][] = [];
			for (const planned of plans[c]) {
				if (aborted) return;
				// Some batches carry a few entries the server has already acknowledged, as a gateway
				// does when it is unsure what got through.
				const again: Entry[] = [];
				if (done.length && rand() < o.resendChance) {
					const old = done[Math.floor(rand() * done.length)];
					again.push(...old.slice(0, 1 + Math.floor(rand() * Math.min(3, old.length))));
				}
				const batch = [...planned, ...again];
				const ack = await postUntilAcknowledged(batch);
				if (!ack) continue;
				checkAck(ack, batch.length, `batch of client ${c}`);
				if (ack.duplicates > again.length) report.answersLostAfterCommit++;
				for (const e of planned) acked.set(e.key, e);
				done.push(planned);
				ackedBatches++;
				// And now and then a whole batch again: all of it must come back as duplicates.
				if (rand() < o.resendChance) {
					const old = done[Math.floor(rand() * done.length)];
					const reAck = await postUntilAcknowledged(old);
					if (reAck) {
						checkAck(reAck, old.length, `resent batch of client ${c}`);
						if (reAck.accepted !== 0) {
							report.badAcknowledgements.push(
								`resent batch of client ${c} counted ${reAck.accepted} entries again`
							);
						}
						report.resendsAcknowledged++;
					}
				}
			}
		}

		async function killer() {
			for (let k = 1; k <= o.kills; k++) {
				// Spread the kills over the run by progress, not by clock, so a slow machine still sees
				// every kill land while the clients are busy.
				const threshold = Math.floor((k * totalBatches) / (o.kills + 1));
				while (ackedBatches < threshold && clientsDone < o.clients && !keeper.exitedOnItsOwn) {
					await sleep(2);
				}
				if (clientsDone === o.clients || keeper.exitedOnItsOwn) return;
				// Every other kill waits for a commit and lands before its answer goes out.
				const mode: KillMode = k % 2 === 0 ? 'after-commit' : 'outside';
				const generation = keeper.upGeneration;
				const signal = await keeper.kill(mode);
				if (generation !== null) killed.add(generation);
				report.kills++;
				if (mode === 'after-commit') report.killsAfterCommit++;
				report.killSignals.push(signal ?? 'none');
				log(`  kill ${k} (${mode}, ${signal}) at ${ackedBatches}/${totalBatches} batches`);
				const t0 = performance.now();
				await keeper.start();
				report.restartMs.push(performance.now() - t0);
			}
		}

		await keeper.start();
		log(`  server ready on port ${keeper.port}; ${o.clients} clients, ${totalBatches} batches`);
		const t0 = performance.now();
		const clients = plans.map((_, c) =>
			client(c).finally(() => {
				clientsDone++;
			})
		);
		const killing = killer().catch((err: Error) => {
			aborted = true;
			throw err;
		});
		await Promise.all([...clients, killing]);
		report.seconds = (performance.now() - t0) / 1000;
		report.killsInterrupting = [...killed].filter((g) => interrupted.has(g)).length;
		report.entriesAcknowledged = acked.size;
		report.serverExitedOnItsOwn = keeper.exitedOnItsOwn;
		// The last stop is a crash too, so the checks read a database as a crash leaves it.
		await keeper.kill();
		report.serverLog = keeper.serverLog;
		await verify(file, acked, report);
		return report;
	} finally {
		await keeper.kill().catch(() => {});
		agent.destroy();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

const sample = (list: string[]) => list.slice(0, 20);

/** Reads the database as the last kill left it and fills the checks into the report. */
async function verify(file: string, acked: Map<string, Entry>, report: CrashReport) {
	const db = openDatabase(file);
	try {
		const raw = rawHandle(db);
		const integrity = raw.pragma('integrity_check') as { integrity_check: string }[];
		report.integrity = integrity.map((r) => r.integrity_check).join('; ');
		report.foreignKeyProblems = (raw.pragma('foreign_key_check') as unknown[]).length;

		const keys = raw
			.prepare(
				`select coalesce(idem_key, '(no key)') as key, count(*) as n from shot_entries group by idem_key`
			)
			.all() as { key: string; n: number }[];
		const inLedger = new Map(keys.map((k) => [k.key, k.n]));
		report.entriesInLedger = keys.reduce((s, k) => s + k.n, 0);
		const duplicated = keys.filter((k) => k.n > 1).map((k) => `${k.key} ×${k.n}`);
		const missing = [...acked.keys()].filter((k) => !inLedger.has(k));
		const neverAcknowledged = keys.map((k) => k.key).filter((k) => !acked.has(k));
		report.keysDuplicated = sample(duplicated);
		report.keysMissing = sample(missing);
		report.keysNeverAcknowledged = sample(neverAcknowledged);
		report.duplicatedCount = duplicated.length;
		report.missingCount = missing.length;
		report.neverAcknowledgedCount = neverAcknowledged.length;

		const mismatch = (what: string, a: number, b: number) => {
			if (a !== b) report.totalsMismatches.push(`${what}: ${a} ≠ ${b}`);
		};
		// What the clients had acknowledged, per die and per die-day.
		const sent = new Map<string, number>();
		for (const e of acked.values()) sent.set(e.die, (sent.get(e.die) ?? 0) + e.shots);

		const dies = raw
			.prepare(
				`select d.id, d.number, d.total_shots,
				        (select coalesce(sum(shots), 0) from shot_entries e where e.die_id = d.id) as ledger
				   from dies d order by d.number`
			)
			.all() as { id: number; number: string; total_shots: number; ledger: number }[];
		for (const d of dies) {
			mismatch(`${d.number} total shots vs ledger sum`, d.total_shots, d.ledger);
			mismatch(`${d.number} ledger sum vs shots acknowledged`, d.ledger, sent.get(d.number) ?? 0);
		}
		const halves = raw
			.prepare(
				`select d.number, h.side, h.shots, h.die_shots_at_install,
				        (select coalesce(sum(shots), 0) from shot_entries e where e.die_id = d.id) as ledger
				   from die_halves h join dies d on d.id = h.die_id where h.active = 1`
			)
			.all() as {
			number: string;
			side: string;
			shots: number;
			die_shots_at_install: number;
			ledger: number;
		}[];
		for (const h of halves) {
			// Shots since the half went in: the ledger less what the die had at its install.
			mismatch(
				`${h.number} ${h.side} half vs ledger since install`,
				h.shots,
				h.ledger - h.die_shots_at_install
			);
		}
		const daily = raw
			.prepare(
				`select d.number || ' ' || x.day as what, x.rolled, x.ledger from (
				   select die_id, day, sum(rolled) as rolled, sum(ledger) as ledger from (
				     select die_id, day, shots as rolled, 0 as ledger from shot_daily
				     union all
				     select die_id, substr(counted_at, 1, 10), 0, shots from shot_entries
				   ) group by die_id, day
				 ) x join dies d on d.id = x.die_id order by what`
			)
			.all() as { what: string; rolled: number; ledger: number }[];
		for (const r of daily) mismatch(`${r.what} daily roll-up vs ledger`, r.rolled, r.ledger);
	} finally {
		await db.destroy();
	}
}
