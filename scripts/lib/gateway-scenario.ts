// The press gateway under faults, end to end: fake presses → MQTT broker → gateway process →
// Castellan's shot-ingest code path (scripts/lib/ingest-server.ts) → SQLite. Three presses on an
// accelerated clock; one die change, one counter reset; the broker stopped and restarted, the
// gateway SIGKILLed and restarted, Castellan unreachable for a while. Afterwards every die's
// ledger total is compared with the shots its press counters advanced while it was mounted.
// Used by tests/integration/gateway-faults.test.ts (aedes and mosquitto) and the bench.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { createInterface } from 'node:readline';
import SQLite from 'better-sqlite3';
import { startBroker, type LocalBroker } from '../../fakes/press/broker';
import { connectFakePlant, RATES, type FakePlant } from '../../fakes/press/fake-press';
import { migrateToLatest, openDatabase } from '../../src/lib/server/db/connect';

const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), '../..');
const PREFIX = 'castellan/presses';
export const MOSQUITTO = '/usr/sbin/mosquitto';

export interface GatewayScenarioOptions {
	broker: 'aedes' | 'mosquitto';
	/** Clock ticks (one minute of press time each). */
	ticks?: number;
	/** Real milliseconds between ticks. */
	tickMs?: number;
	faults?: boolean;
}

export interface GatewayScenarioReport {
	/** Per die: shots its press counters advanced while mounted, and the ledger's total. */
	dies: { die: string; truth: number; ledger: number }[];
	entries: number;
	keysDuplicated: number;
	resetEntries: number;
	/** The gateway's own report at the end (state file). */
	refused: number;
	unassigned: number;
	outbox: number;
	faults: string[];
	gatewayLog: string[];
	settledMs: number;
}

export async function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const s = net.createServer();
		s.once('error', reject);
		s.listen(0, '127.0.0.1', () => {
			const port = (s.address() as net.AddressInfo).port;
			s.close(() => resolve(port));
		});
	});
}

const debug = (line: string) => {
	if (process.env.GATEWAY_SCENARIO_DEBUG) console.error(`[scenario] ${line}`);
};
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export function waitForLine(
	child: ChildProcess,
	pattern: RegExp,
	timeoutMs: number
): Promise<RegExpExecArray> {
	return new Promise((resolve, reject) => {
		const timer = setTimeout(() => reject(new Error(`no "${pattern}" in time`)), timeoutMs);
		const lines = createInterface({ input: child.stdout! });
		lines.on('line', (line) => {
			const m = pattern.exec(line);
			if (m) {
				clearTimeout(timer);
				resolve(m);
			}
		});
		child.once('exit', () => reject(new Error(`process exited before "${pattern}"`)));
	});
}

/** The plant: one owner, three presses, four dies with halves, a booking for the press that does not name its die. */
export async function makeGatewayTestPlant(file: string) {
	const db = openDatabase(file);
	await migrateToLatest(db);
	const customer = await db
		.insertInto('customers')
		.values({ code: 'GWTEST', name: 'Gateway Test Ltd' })
		.returning('id')
		.executeTakeFirstOrThrow();
	await db
		.insertInto('machines')
		.values([
			{ name: 'HC-1', chamber: 'hot', clamp_force_kn: 785 },
			{ name: 'HC-2', chamber: 'hot', clamp_force_kn: 785 },
			{ name: 'CC-1', chamber: 'cold', clamp_force_kn: 8238 }
		])
		.execute();
	const alloys = new Map(
		(await db.selectFrom('alloys').select(['id', 'code']).execute()).map((a) => [a.code, a.id])
	);
	const at = new Date(Date.now() - 40 * 86_400_000).toISOString();
	const dies: Record<string, number> = {};
	for (const [number, alloy, process] of [
		['D-9001', 'ZP0410', 'hot_chamber'],
		['D-9002', 'ZP0410', 'hot_chamber'],
		['D-9003', 'ZP0400', 'hot_chamber'],
		['D-9004', 'A380', 'cold_chamber']
	] as const) {
		const row = await db
			.insertInto('dies')
			.values({
				number,
				part_name: `Gateway part ${number}`,
				part_number: null,
				customer_id: customer.id,
				alloy_id: alloys.get(alloy)!,
				process,
				cavities: 1,
				projected_area_cm2: 120,
				location: null,
				notes: null,
				expected_life_shots: null,
				created_at: at,
				updated_at: at,
				retired_at: null
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		dies[number] = row.id;
		for (const side of ['cover', 'ejector'] as const) {
			await db
				.insertInto('die_halves')
				.values({
					die_id: row.id,
					side,
					serial: `${number}-${side}`,
					steel: null,
					hardness_hrc: null,
					installed_at: at,
					removed_at: null,
					removal_reason: null
				})
				.execute();
		}
	}
	const cc1 = await db
		.selectFrom('machines')
		.select('id')
		.where('name', '=', 'CC-1')
		.executeTakeFirstOrThrow();
	await db
		.insertInto('press_bookings')
		.values({
			die_id: dies['D-9004'],
			machine_id: cc1.id,
			starts_at: new Date(Date.now() - 3_600_000).toISOString(),
			ends_at: new Date(Date.now() + 86_400_000).toISOString(),
			order_ref: 'GW-ORDER-1',
			parts: 1000,
			shots_per_hour: 80,
			created_by: null,
			created_at: at,
			cancelled_at: null,
			cancelled_by: null,
			cancel_reason: null,
			notes: null
		})
		.execute();
	await db.destroy();
}

interface Broker {
	url: string;
	stop(): Promise<void>;
	start(): Promise<void>;
	close(): Promise<void>;
}

async function aedesBroker(): Promise<Broker> {
	const port = await freePort();
	let running: LocalBroker | null = await startBroker(port);
	return {
		url: running.url,
		async stop() {
			await running?.close();
			running = null;
		},
		async start() {
			running = await startBroker(port);
		},
		async close() {
			await running?.close();
		}
	};
}

async function mosquittoBroker(dir: string): Promise<Broker> {
	const port = await freePort();
	const conf = path.join(dir, 'mosquitto.conf');
	fs.writeFileSync(
		conf,
		[
			`listener ${port} 127.0.0.1`,
			'allow_anonymous true',
			'persistence true',
			`persistence_location ${dir}/`,
			'autosave_interval 1',
			...(process.getuid?.() === 0 ? ['user root'] : [])
		].join('\n') + '\n'
	);
	let child: ChildProcess | null = null;
	const start = async () => {
		child = spawn(MOSQUITTO, ['-c', conf], { stdio: 'ignore' });
		// Ready when the port answers.
		for (let i = 0; i < 100; i++) {
			const ok = await new Promise<boolean>((resolve) => {
				const s = net.connect(port, '127.0.0.1', () => {
					s.end();
					resolve(true);
				});
				s.on('error', () => resolve(false));
			});
			if (ok) return;
			await sleep(50);
		}
		throw new Error('mosquitto did not start');
	};
	const stop = async () => {
		const c = child;
		child = null;
		if (!c || c.exitCode !== null) return;
		await new Promise<void>((resolve) => {
			c.once('exit', () => resolve());
			c.kill('SIGTERM');
		});
	};
	await start();
	return { url: `mqtt://127.0.0.1:${port}`, stop, start, close: stop };
}

export async function runGatewayScenario(
	opts: GatewayScenarioOptions
): Promise<GatewayScenarioReport> {
	const ticks = opts.ticks ?? 480;
	const tickMs = opts.tickMs ?? 20;
	const faults = opts.faults ?? true;
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-gateway-'));
	const file = path.join(dir, 'castellan.db');
	const stateFile = path.join(dir, 'gateway-state.json');
	const faultLog: string[] = [];
	const gatewayLog: string[] = [];
	const children = new Set<ChildProcess>();
	let broker: Broker | null = null;
	let plant: FakePlant | null = null;
	try {
		await makeGatewayTestPlant(file);

		// Castellan's ingest path.
		const apiPort = await freePort();
		const startApi = async () => {
			const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/lib/ingest-server.ts'], {
				cwd: ROOT,
				env: {
					...process.env,
					DATABASE_PATH: file,
					PORT: String(apiPort),
					INGEST_EXIT_WITH_PARENT: '1'
				},
				stdio: ['pipe', 'pipe', 'pipe']
			});
			child.stdin!.on('error', () => {});
			child.stderr!.on('data', () => {});
			children.add(child);
			child.once('exit', () => children.delete(child));
			await waitForLine(child, /^ready (\d+)$/, 30_000);
			return child;
		};
		let api = await startApi();
		debug('api up');

		broker = opts.broker === 'aedes' ? await aedesBroker() : await mosquittoBroker(dir);

		const startGateway = async () => {
			const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/gateway.ts'], {
				cwd: ROOT,
				env: {
					...process.env,
					GATEWAY_MQTT_URL: broker!.url,
					GATEWAY_TOPIC_PREFIX: PREFIX,
					CASTELLAN_URL: `http://127.0.0.1:${apiPort}`,
					CASTELLAN_TOKEN: 'scenario-token',
					GATEWAY_FLUSH_SECONDS: '0.25',
					GATEWAY_STATE_FILE: stateFile,
					GATEWAY_CLIENT_ID: `castellan-gateway-scenario-${process.pid}`,
					GATEWAY_RETRY_MIN_MS: '100',
					GATEWAY_RETRY_MAX_MS: '800'
				},
				stdio: ['ignore', 'pipe', 'pipe']
			});
			children.add(child);
			child.once('exit', () => children.delete(child));
			child.stderr!.setEncoding('utf8');
			child.stderr!.on('data', (t: string) => gatewayLog.push(...t.trimEnd().split('\n')));
			const connected = waitForLine(child, /connected to /, 30_000);
			createInterface({ input: child.stdout! }).on('line', (l) => {
				gatewayLog.push(l);
				if (gatewayLog.length > 400) gatewayLog.splice(0, gatewayLog.length - 400);
			});
			await connected;
			return child;
		};
		debug('broker up');
		let gateway = await startGateway();
		debug('gateway up');

		plant = await connectFakePlant(broker.url, PREFIX, [
			{ name: 'HC-1', shotsPerHour: RATES.hotChamberZinc, die: 'D-9001' },
			{ name: 'HC-2', shotsPerHour: RATES.hotChamberZinc, die: 'D-9003' },
			// This cell does not report its die: the gateway asks Castellan (the booking).
			{ name: 'CC-1', shotsPerHour: RATES.coldChamberAluminium, die: 'D-9004' }
		]);
		debug('plant connected');
		const [hc1, hc2] = plant.presses;
		// The press clock starts two days back so every count is in the past, at real rates.
		let clock = Date.now() - 2 * 86_400_000;
		const at = () => new Date(clock);
		await hc1.mount('D-9001', at());
		await hc2.mount('D-9003', at());
		for (const p of plant.presses) await p.report(at());

		for (let tick = 1; tick <= ticks; tick++) {
			clock += 60_000;
			for (const p of plant.presses) p.run(60_000);
			if (tick === Math.round(ticks * 0.2)) {
				await hc1.mount('D-9002', at());
				faultLog.push(`tick ${tick}: die change on HC-1 (D-9001 → D-9002)`);
			}
			if (tick === Math.round(ticks * 0.3)) {
				await hc2.resetCounter(at());
				faultLog.push(`tick ${tick}: counter reset on HC-2`);
			}
			for (const p of plant.presses) await p.report(at());
			if (faults && tick === Math.round(ticks * 0.4)) {
				await broker.stop();
				faultLog.push(`tick ${tick}: broker stopped`);
			}
			if (faults && tick === Math.round(ticks * 0.45)) {
				await broker.start();
				faultLog.push(`tick ${tick}: broker restarted`);
			}
			if (faults && tick === Math.round(ticks * 0.6)) {
				gateway.kill('SIGKILL');
				faultLog.push(`tick ${tick}: gateway SIGKILLed`);
			}
			if (faults && tick === Math.round(ticks * 0.65)) {
				gateway = await startGateway();
				faultLog.push(`tick ${tick}: gateway restarted`);
			}
			if (faults && tick === Math.round(ticks * 0.75)) {
				api.kill('SIGKILL');
				faultLog.push(`tick ${tick}: Castellan unreachable`);
			}
			if (faults && tick === Math.round(ticks * 0.85)) {
				api = await startApi();
				faultLog.push(`tick ${tick}: Castellan back`);
			}
			if (tick % 50 === 0) debug(`tick ${tick}`);
			await sleep(tickMs);
		}
		// One last reading a minute later, so the final interval closes on a known value.
		clock += 60_000;
		for (const p of plant.presses) await p.report(at());

		const truth = new Map<string, number>();
		for (const p of plant.presses)
			for (const [die, n] of p.truth) truth.set(die, (truth.get(die) ?? 0) + n);

		// Wait until the ledger holds what the presses counted (or give up and report the gap).
		const started = Date.now();
		const read = new SQLite(file, { readonly: true });
		const totals = () =>
			new Map(
				(
					read.prepare('select number, total_shots from dies').all() as {
						number: string;
						total_shots: number;
					}[]
				).map((r) => [r.number, r.total_shots])
			);
		let ledger = totals();
		while (Date.now() - started < 60_000) {
			ledger = totals();
			if ([...truth].every(([die, n]) => ledger.get(die) === n)) break;
			await sleep(200);
		}
		const settledMs = Date.now() - started;
		// A little longer: anything still arriving would be a doubled count.
		await sleep(800);
		ledger = totals();
		const entries = (read.prepare('select count(*) as n from shot_entries').get() as { n: number })
			.n;
		const keysDuplicated = (
			read
				.prepare(
					'select count(*) as n from (select idem_key from shot_entries where idem_key is not null group by idem_key having count(*) > 1)'
				)
				.get() as { n: number }
		).n;
		const resetEntries = (
			read
				.prepare("select count(*) as n from shot_entries where idem_key like 'gw:HC-2:1:%'")
				.get() as { n: number }
		).n;
		read.close();

		gateway.kill('SIGTERM');
		await new Promise((r) => gateway.once('exit', r));
		const state = JSON.parse(fs.readFileSync(stateFile, 'utf8'));
		return {
			dies: [...new Set([...truth.keys(), ...ledger.keys()])].sort().map((die) => ({
				die,
				truth: truth.get(die) ?? 0,
				ledger: ledger.get(die) ?? 0
			})),
			entries,
			keysDuplicated,
			resetEntries,
			refused: state.refused.length,
			unassigned: state.unassigned.length,
			outbox: state.outbox.length,
			faults: faultLog,
			gatewayLog,
			settledMs
		};
	} finally {
		await plant?.close().catch(() => {});
		for (const c of children) c.kill('SIGKILL');
		await broker?.close().catch(() => {});
		fs.rmSync(dir, { recursive: true, force: true });
	}
}
