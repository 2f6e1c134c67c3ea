// The press gateway at run time: subscribes to the presses' topics on the plant's MQTT broker,
// keeps the counter bookkeeping (press-counters.ts) in a state file, and delivers closed intervals
// to Castellan's shot API. No count is lost and none is doubled:
//  - a QoS 1 message is acknowledged to the broker only after it is in the journal (a kill before
//    that makes the broker deliver it again; a redelivered reading is stale), and closed intervals
//    are written with the whole state, flushed to disk, before they are sent;
//  - an interval keeps its idempotency key from the moment it is closed, and leaves the outbox
//    only when Castellan has acknowledged it, so a restart or an outage re-sends the same keys.
import mqtt, { type IPublishPacket, type MqttClient } from 'mqtt';
import type { CastellanClient } from './castellan-client';
import {
	adoptMountedDie,
	applyRecord,
	closeAllIntervals,
	pressesNeedingDie,
	type GatewayState,
	type PressRecord
} from './press-counters';
import { Journal, loadState, saveState } from './state-file';

export interface GatewayConfig {
	mqttUrl: string;
	topicPrefix: string;
	stateFile: string;
	castellan: CastellanClient;
	/** How often open intervals are closed and delivered. */
	flushMs: number;
	/** MQTT client id: fixed, so the broker keeps the session across restarts. */
	clientId: string;
	maxBatch?: number;
	retryMinMs?: number;
	retryMaxMs?: number;
	log?: (line: string) => void;
}

export interface GatewayStatus {
	connected: boolean;
	presses: Record<string, { counter: number | null; at: string | null; die: string | null }>;
	outbox: number;
	unassigned: number;
	refused: number;
	delivered: number;
	lastError: string | null;
}

export interface Gateway {
	status(): GatewayStatus;
	/** Closes open intervals and delivers now (tests, shutdown). */
	flush(): Promise<void>;
	stop(): Promise<void>;
}

export async function startGateway(config: GatewayConfig): Promise<Gateway> {
	const log = config.log ?? ((line: string) => console.log(line));
	const maxBatch = config.maxBatch ?? 1000;
	const retryMin = config.retryMinMs ?? 1000;
	const retryMax = config.retryMaxMs ?? 60_000;
	const prefix = config.topicPrefix.replace(/\/+$/, '');
	const state: GatewayState = loadState(config.stateFile);
	const journalFile = `${config.stateFile}.journal`;
	const replayed = Journal.replay(journalFile, state);
	if (replayed) log(`replayed ${replayed} message(s) from the journal.`);
	const journal = new Journal(journalFile);
	/** Writes the whole state (flushed to disk); the journal is then empty. */
	const checkpoint = () => {
		saveState(config.stateFile, state);
		journal.clear();
	};
	checkpoint();
	let delivered = 0;
	let lastError: string | null = null;
	let stopped = false;

	const reported = new Set<string>();
	const reportOnce = (key: string, line: string) => {
		if (reported.has(key)) return;
		reported.add(key);
		log(line);
	};

	/** A broker message as a record (its time fixed now, so a replay reads it the same), or null. */
	function readMessage(topic: string, payload: Buffer): PressRecord | null {
		if (!topic.startsWith(prefix + '/')) return null;
		const [press, kind, ...rest] = topic.slice(prefix.length + 1).split('/');
		if (!press || rest.length || (kind !== 'counter' && kind !== 'die')) return null;
		let body: { counter?: unknown; at?: unknown; die?: unknown };
		try {
			body = JSON.parse(payload.toString('utf8'));
		} catch {
			reportOnce(`json:${press}`, `press ${press}: a message on ${topic} is not JSON; ignored.`);
			return null;
		}
		const at = typeof body.at === 'string' ? body.at : new Date().toISOString();
		if (kind === 'counter') return { press, kind, counter: body.counter, at };
		const die = typeof body.die === 'string' && body.die.trim() ? body.die.trim() : null;
		return {
			press,
			kind,
			die,
			at,
			...(body.counter !== undefined ? { counter: body.counter } : {})
		};
	}

	function takeRecord(r: PressRecord) {
		const outcome = applyRecord(state, r);
		if (outcome === 'invalid' && r.kind === 'counter') {
			log(
				`press ${r.press}: counter reading ${JSON.stringify(r.counter)} at ${r.at} is not a whole number ≥ 0 with a time; ignored.`
			);
		} else if (outcome === 'reset' && r.kind === 'counter') {
			log(
				`press ${r.press}: counter went down to ${String(r.counter)} — a reset or rollover; a new interval starts at 0.`
			);
		} else if (r.kind === 'die') {
			log(`press ${r.press}: die ${r.die ?? '(none)'} mounted.`);
		}
	}

	// Delivery: one batch in flight at a time, back-off while Castellan cannot take it.
	let delivering: Promise<void> | null = null;
	let retryDelay = retryMin;
	let retryTimer: NodeJS.Timeout | null = null;
	async function deliverOnce(): Promise<void> {
		while (!stopped && state.outbox.length) {
			const batch = state.outbox.slice(0, maxBatch);
			const result = await config.castellan.postEntries(batch);
			if (result.kind === 'retry') {
				lastError = `Castellan: ${result.error ?? 'no answer'}`;
				log(
					`delivery of ${batch.length} entries failed (${lastError}); retrying in ${(retryDelay / 1000).toFixed(1)} s.`
				);
				if (!retryTimer && !stopped) {
					retryTimer = setTimeout(() => {
						retryTimer = null;
						void deliver();
					}, retryDelay);
				}
				retryDelay = Math.min(retryDelay * 2, retryMax);
				return;
			}
			retryDelay = retryMin;
			lastError = null;
			if (result.kind === 'refused') {
				// All-or-nothing on Castellan's side: nothing of this batch was counted. Set the named
				// rows aside (kept and reported) and send the rest again.
				const now = new Date().toISOString();
				const keep = [];
				for (let i = 0; i < batch.length; i++) {
					const reason = result.refused?.get(i);
					if (reason) {
						state.refused.push({ entry: batch[i], reason, at: now });
						log(
							`entry ${batch[i].key} (${batch[i].die}, ${batch[i].shots} shots) refused by Castellan: ${reason}`
						);
					} else keep.push(batch[i]);
				}
				state.outbox.splice(0, batch.length, ...keep);
				checkpoint();
				continue;
			}
			state.outbox.splice(0, batch.length);
			delivered += batch.length;
			for (const w of result.warnings ?? []) {
				const e = batch[w.index];
				if (e) log(`entry ${e.key} (${e.die}) counted, marked for review: ${w.message}`);
			}
			checkpoint();
		}
	}
	function deliver(): Promise<void> {
		if (!delivering) {
			delivering = deliverOnce().finally(() => {
				delivering = null;
			});
		}
		return delivering;
	}

	async function askCastellanForDies() {
		for (const press of pressesNeedingDie(state)) {
			const die = await config.castellan.mountedDie(press);
			if (die === undefined) continue; // Castellan unreachable: ask again next flush.
			adoptMountedDie(state, press, die);
			if (die === null) {
				reportOnce(
					`nodie:${press}`,
					`press ${press}: counts arrive but no die is mounted on it (neither the press nor Castellan names one); they are kept as unassigned.`
				);
			}
		}
	}

	let flushing: Promise<void> | null = null;
	function flush(): Promise<void> {
		if (!flushing) {
			flushing = flushNow().finally(() => {
				flushing = null;
			});
		}
		return flushing;
	}
	async function flushNow() {
		await askCastellanForDies();
		closeAllIntervals(state);
		if (state.unassigned.length) {
			reportOnce(
				`unassigned:${state.unassigned.length}`,
				`${state.unassigned.length} interval(s) kept without a die (see the state file's "unassigned").`
			);
		}
		checkpoint();
		await deliver();
	}

	const client: MqttClient = mqtt.connect(config.mqttUrl, {
		clientId: config.clientId,
		clean: false,
		reconnectPeriod: 500,
		connectTimeout: 10_000,
		resubscribe: true
	});
	client.handleMessage = (packet: IPublishPacket, done) => {
		try {
			const record = readMessage(
				packet.topic,
				Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload)
			);
			if (record) {
				// Journalled before it is acknowledged: a kill before the write makes the broker deliver
				// it again (and a redelivered reading is stale once taken in).
				journal.append(record);
				takeRecord(record);
			}
		} catch (err) {
			log(`message on ${packet.topic} could not be taken in: ${(err as Error).message}`);
		}
		done();
	};
	client.on('connect', (ack) => {
		log(`connected to ${config.mqttUrl}${ack.sessionPresent ? ' (session kept)' : ''}.`);
		if (!ack.sessionPresent) {
			client.subscribe([`${prefix}/+/counter`, `${prefix}/+/die`], { qos: 1 }, (err) => {
				if (err) log(`subscribe failed: ${err.message}`);
			});
		}
	});
	client.on('error', (err) => {
		lastError = `MQTT: ${err.message}`;
		log(`broker error: ${err.message}`);
	});
	client.on('offline', () => log('broker connection lost; reconnecting…'));

	const timer = setInterval(() => void flush(), config.flushMs);
	// Whatever was waiting when the gateway stopped goes out now.
	void deliver();

	return {
		status() {
			const presses: GatewayStatus['presses'] = {};
			for (const [name, p] of Object.entries(state.presses)) {
				presses[name] = { counter: p.last?.counter ?? null, at: p.last?.at ?? null, die: p.die };
			}
			return {
				connected: client.connected,
				presses,
				outbox: state.outbox.length,
				unassigned: state.unassigned.length,
				refused: state.refused.length,
				delivered,
				lastError
			};
		},
		flush,
		async stop() {
			stopped = true;
			clearInterval(timer);
			if (retryTimer) clearTimeout(retryTimer);
			await delivering;
			checkpoint();
			journal.close();
			await client.endAsync();
		}
	};
}
