// Fake presses for the demo and the tests: each one publishes its cumulative shot counter and the
// die it has mounted, in Castellan's topic scheme, on its own clock. The clock can run faster
// than real time (tests) so that hours of production pass in seconds at realistic shot rates.
//   {prefix}/{press}/counter  { "counter": 1234567, "at": "2026-12-03T10:15:00.000Z" }
//   {prefix}/{press}/die      { "die": "D-0147", "at": …, "counter": 1234567 }  (retained)
// It also keeps the truth a test checks against: the shots each die took while mounted.
import mqtt, { type MqttClient } from 'mqtt';

export interface FakePressOptions {
	name: string;
	/** Shots per hour of press time (see RATES below). */
	shotsPerHour: number;
	die: string | null;
	counter?: number;
}

/**
 * Typical cycle rates, common practice (not from a published table): a hot-chamber zinc cell on
 * small parts runs a few hundred shots an hour (cycle of roughly 6–12 s); a cold-chamber aluminium
 * cell on mid-size parts runs fewer, roughly 40–120 an hour (cycle of 30–90 s).
 */
export const RATES = { hotChamberZinc: 400, coldChamberAluminium: 80 } as const;

export class FakePress {
	readonly name: string;
	counter: number;
	die: string | null;
	readonly shotsPerHour: number;
	/** Shots each die took while mounted, from the first published reading on. */
	readonly truth = new Map<string, number>();
	private carry = 0;
	private started = false;

	constructor(
		private client: MqttClient,
		private prefix: string,
		opts: FakePressOptions
	) {
		this.name = opts.name;
		this.shotsPerHour = opts.shotsPerHour;
		this.die = opts.die;
		this.counter = opts.counter ?? 1_000_000 + Math.floor(Math.random() * 1_000_000);
	}

	private topic(kind: 'counter' | 'die') {
		return `${this.prefix}/${this.name}/${kind}`;
	}

	/**
	 * QoS 1, without waiting for the broker: a press controller keeps producing while its broker
	 * is away, and the MQTT client queues what it could not hand over (in order).
	 */
	private publish(kind: 'counter' | 'die', body: object, retain = false): Promise<void> {
		this.client.publish(this.topic(kind), JSON.stringify(body), { qos: 1, retain }, (err) => {
			if (err) this.errors.push(err.message);
		});
		return Promise.resolve();
	}
	readonly errors: string[] = [];

	/** Publishes the counter as it stands now (the gateway's baseline on the first call). */
	async report(at: Date): Promise<void> {
		this.started = true;
		await this.publish('counter', { counter: this.counter, at: at.toISOString() });
	}

	/** Runs the press for `ms` of press time; returns the shots made (fractions carried over). */
	run(ms: number): number {
		const exact = (this.shotsPerHour * ms) / 3_600_000 + this.carry;
		const shots = Math.floor(exact);
		this.carry = exact - shots;
		this.counter += shots;
		if (this.started && this.die && shots > 0) {
			this.truth.set(this.die, (this.truth.get(this.die) ?? 0) + shots);
		}
		return shots;
	}

	/** A die change: the counter at the change goes with the message (retained for newcomers). */
	async mount(die: string | null, at: Date): Promise<void> {
		this.die = die;
		await this.publish('die', { die, at: at.toISOString(), counter: this.counter }, true);
	}

	/** A controller swap or rollover: the last value goes out first, then the counter restarts. */
	async resetCounter(at: Date, to = 0): Promise<void> {
		await this.report(at);
		this.counter = to;
	}
}

export interface FakePlant {
	presses: FakePress[];
	client: MqttClient;
	close(): Promise<void>;
}

export async function connectFakePlant(
	mqttUrl: string,
	prefix: string,
	presses: FakePressOptions[]
): Promise<FakePlant> {
	const client = mqtt.connect(mqttUrl, {
		clientId: `castellan-fake-presses-${process.pid}-${Date.now()}`,
		reconnectPeriod: 300
	});
	await new Promise<void>((resolve, reject) => {
		client.once('connect', () => resolve());
		client.once('error', reject);
	});
	return {
		presses: presses.map((p) => new FakePress(client, prefix, p)),
		client,
		close: () => client.endAsync()
	};
}
