// The demo's press floor: an in-process MQTT broker, a few fake presses with the demo plant's dies
// mounted, and the press gateway posting their counts to the running app — so a new user sees
// counts arrive on the board within a minute. Started by `npm run demo` (DEMO_PRESSES=off skips it).
// Along the way one press has its counter reset (a controller swap) and one falls silent for a
// while, as real presses do.
import path from 'node:path';
import SQLite from 'better-sqlite3';
import { castellanClient } from '../../gateway/castellan-client';
import { startGateway, type Gateway } from '../../gateway/gateway';
import { startBroker, type LocalBroker } from './broker';
import { connectFakePlant, RATES, type FakePlant } from './fake-press';

export interface DemoPressOptions {
	databasePath: string;
	castellanUrl: string;
	token: string;
	mqttPort: number;
	stateFile: string;
	/** Real milliseconds between counter reports. */
	reportMs?: number;
	log?: (line: string) => void;
}

export interface DemoPresses {
	broker: LocalBroker;
	presses: { press: string; die: string }[];
	close(): Promise<void>;
}

/** Up to two hot- and two cold-chamber presses, each with a ready or running die of its process. */
function pickMounts(databasePath: string): { press: string; die: string; hot: boolean }[] {
	const db = new SQLite(databasePath, { readonly: true });
	try {
		const presses = db
			.prepare(`select name, chamber from machines where status = 'available' order by name`)
			.all() as { name: string; chamber: 'hot' | 'cold' }[];
		const dies = db
			.prepare(
				`select number, process from dies where status in ('ready', 'running') order by status desc, number`
			)
			.all() as { number: string; process: 'hot_chamber' | 'cold_chamber' }[];
		const used = new Set<string>();
		const mounts: { press: string; die: string; hot: boolean }[] = [];
		for (const chamber of ['hot', 'cold'] as const) {
			for (const p of presses.filter((x) => x.chamber === chamber).slice(0, 2)) {
				const die = dies.find((d) => !used.has(d.number) && d.process === `${chamber}_chamber`);
				if (!die) continue;
				used.add(die.number);
				mounts.push({ press: p.name, die: die.number, hot: chamber === 'hot' });
			}
		}
		return mounts;
	} finally {
		db.close();
	}
}

export async function startDemoPresses(opts: DemoPressOptions): Promise<DemoPresses> {
	const log = opts.log ?? ((l: string) => console.log(l));
	const reportMs = opts.reportMs ?? 10_000;
	const prefix = 'castellan/presses';
	const mounts = pickMounts(opts.databasePath);
	const broker = await startBroker(opts.mqttPort);
	let plant: FakePlant | null = null;
	let gateway: Gateway | null = null;
	let timer: NodeJS.Timeout | null = null;
	try {
		gateway = await startGateway({
			mqttUrl: broker.url,
			topicPrefix: prefix,
			stateFile: path.resolve(opts.stateFile),
			clientId: 'castellan-demo-gateway',
			flushMs: 30_000,
			castellan: castellanClient(opts.castellanUrl, opts.token),
			log: (line) => log(`[gateway] ${line}`)
		});
		plant = await connectFakePlant(
			broker.url,
			prefix,
			mounts.map((m) => ({
				name: m.press,
				die: m.die,
				shotsPerHour: m.hot ? RATES.hotChamberZinc : RATES.coldChamberAluminium
			}))
		);
		const now = () => new Date();
		for (const p of plant.presses) {
			await p.mount(p.die, now());
			await p.report(now());
		}
		const started = Date.now();
		let resetDone = false;
		const quiet = plant.presses[1] ?? null;
		timer = setInterval(() => {
			const elapsed = Date.now() - started;
			for (const p of plant!.presses) {
				// One press stands still (no shots, no reports) from minute 5 to minute 8.
				const silent = p === quiet && elapsed > 5 * 60_000 && elapsed < 8 * 60_000;
				if (silent) continue;
				p.run(reportMs);
				void p.report(now());
			}
			if (!resetDone && elapsed > 3 * 60_000 && plant!.presses[0]) {
				resetDone = true;
				void plant!.presses[0].resetCounter(now());
			}
		}, reportMs);
	} catch (err) {
		await plant?.close().catch(() => {});
		await gateway?.stop().catch(() => {});
		await broker.close();
		throw err;
	}
	return {
		broker,
		presses: mounts.map(({ press, die }) => ({ press, die })),
		async close() {
			if (timer) clearInterval(timer);
			await plant?.close().catch(() => {});
			await gateway?.stop().catch(() => {});
			await broker.close();
		}
	};
}
