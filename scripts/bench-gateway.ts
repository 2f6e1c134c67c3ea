// Press gateway throughput: counter messages per second that the gateway turns into ledger
// entries (broker → gateway → POST /api/v1/shots code path → SQLite, until the ledger holds every
// shot), against the broker's own delivery rate to a bare QoS 1 subscriber in the same run.
//   npx tsx scripts/bench-gateway.ts            (also part of `npm run bench`)
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import SQLite from 'better-sqlite3';
import mqtt from 'mqtt';
import { startBroker } from '../fakes/press/broker';
import { castellanClient } from '../gateway/castellan-client';
import { startGateway } from '../gateway/gateway';
import { runWhenCalledDirectly, type BenchFigure } from './lib/bench-report';
import { freePort, makeGatewayTestPlant, waitForLine } from './lib/gateway-scenario';

const MESSAGES = Number(process.env.BENCH_GATEWAY_MESSAGES ?? 20_000);
const PRESSES = [
	['HC-1', 'D-9001'],
	['HC-2', 'D-9003'],
	['CC-1', 'D-9004']
] as const;
/** The gateway should keep up with at least half of what the broker alone delivers. */
const TARGET_RATIO = 0.5;
const PREFIX = 'castellan/presses';

/** The same messages for both runs: each press's counter one shot further every 10 s of press time. */
function messages(): { topic: string; payload: string }[] {
	const out: { topic: string; payload: string }[] = [];
	const t0 = Date.now() - 3 * 86_400_000;
	for (let i = 0; out.length < MESSAGES; i++) {
		for (const [press] of PRESSES) {
			out.push({
				topic: `${PREFIX}/${press}/counter`,
				payload: JSON.stringify({
					counter: 500_000 + i,
					at: new Date(t0 + i * 10_000).toISOString()
				})
			});
		}
	}
	return out.slice(0, MESSAGES);
}

async function publishAll(url: string, list: { topic: string; payload: string }[]) {
	const pub = await mqtt.connectAsync(url, { clientId: `bench-pub-${Date.now()}` });
	await Promise.all(list.map((m) => pub.publishAsync(m.topic, m.payload, { qos: 1 })));
	return pub;
}

async function brokerRate(list: { topic: string; payload: string }[]): Promise<number> {
	const broker = await startBroker(0);
	const sub = await mqtt.connectAsync(broker.url, {
		clientId: `bench-sub-${Date.now()}`,
		clean: false
	});
	await sub.subscribeAsync(`${PREFIX}/+/counter`, { qos: 1 });
	let got = 0;
	const done = new Promise<void>((resolve) => {
		sub.on('message', () => {
			if (++got === list.length) resolve();
		});
	});
	const t = performance.now();
	const pub = await publishAll(broker.url, list);
	await done;
	const ms = performance.now() - t;
	await pub.endAsync();
	await sub.endAsync();
	await broker.close();
	return (list.length / ms) * 1000;
}

async function gatewayRate(
	list: { topic: string; payload: string }[]
): Promise<{ rate: number; exact: boolean }> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-bench-gateway-'));
	const file = path.join(dir, 'castellan.db');
	await makeGatewayTestPlant(file);
	const port = await freePort();
	const api = spawn(process.execPath, ['--import', 'tsx', 'scripts/lib/ingest-server.ts'], {
		env: { ...process.env, DATABASE_PATH: file, PORT: String(port), INGEST_EXIT_WITH_PARENT: '1' },
		stdio: ['pipe', 'pipe', 'inherit']
	});
	api.stdin!.on('error', () => {});
	const broker = await startBroker(0);
	try {
		await waitForLine(api, /^ready (\d+)$/, 30_000);
		const gateway = await startGateway({
			mqttUrl: broker.url,
			topicPrefix: PREFIX,
			stateFile: path.join(dir, 'state.json'),
			clientId: 'bench-gateway',
			flushMs: 100,
			castellan: castellanClient(`http://127.0.0.1:${port}`, 'bench'),
			log: () => {}
		});
		// Mount the dies and take the baseline readings before the clock starts.
		const setup = await mqtt.connectAsync(broker.url, { clientId: 'bench-setup' });
		const t0 = new Date(Date.now() - 4 * 86_400_000).toISOString();
		for (const [press, die] of PRESSES) {
			await setup.publishAsync(`${PREFIX}/${press}/die`, JSON.stringify({ die, at: t0 }), {
				qos: 1
			});
			await setup.publishAsync(
				`${PREFIX}/${press}/counter`,
				JSON.stringify({ counter: 499_999, at: t0 }),
				{ qos: 1 }
			);
		}
		await setup.endAsync();
		while (Object.keys(gateway.status().presses).length < PRESSES.length)
			await new Promise((r) => setTimeout(r, 20));

		// Every message adds one shot to its press's die.
		const expected = list.length;
		const db = new SQLite(file, { readonly: true });
		const total = () =>
			(
				db
					.prepare(
						`select sum(total_shots) as n from dies where number in ('D-9001','D-9003','D-9004')`
					)
					.get() as { n: number }
			).n;
		const t = performance.now();
		const pub = await publishAll(broker.url, list);
		const deadline = Date.now() + 300_000;
		while (total() < expected && Date.now() < deadline) await new Promise((r) => setTimeout(r, 10));
		const ms = performance.now() - t;
		const exact = total() === expected;
		db.close();
		await pub.endAsync();
		await gateway.stop();
		return { rate: (list.length / ms) * 1000, exact };
	} finally {
		api.kill('SIGKILL');
		await broker.close();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

export async function run(): Promise<BenchFigure[]> {
	const list = messages();
	const broker = await brokerRate(list);
	const { rate, exact } = await gatewayRate(list);
	const ratio = rate / broker;
	return [
		{
			figure: `press gateway: broker alone, QoS 1 delivery (${MESSAGES} messages)`,
			value: broker,
			unit: 'msg/s',
			target: 'reference',
			pass: true
		},
		{
			figure: 'press gateway: counter messages into the ledger',
			value: rate,
			unit: 'msg/s',
			target: 'info',
			pass: exact
		},
		{
			figure: 'press gateway / broker delivery rate',
			value: ratio,
			unit: '×',
			target: `≥ ${TARGET_RATIO}`,
			ratio,
			pass: ratio >= TARGET_RATIO && exact
		}
	];
}

await runWhenCalledDirectly(import.meta.url, run);
