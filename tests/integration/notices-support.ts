// Shared fixtures for the notices integration tests: a small plant whose dies stand at every
// service state, plus users who should and should not hear about them.
import { createServer, type AddressInfo } from 'node:net';
import { expect } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import type { StoredMessage } from '../../fakes/mail/server';

export const NOW = '2026-03-02T06:00:00.000Z';
export const ORIGIN = 'https://castellan.test';
const DAY = 86_400_000;

export const at = (base: string, ms: number) => new Date(Date.parse(base) + ms).toISOString();
export const hours = (n: number) => n * 3_600_000;
export const days = (n: number) => n * DAY;

/** Who should get the service digest (toolroom lead and toolmaker with notices on). */
export const TOOLROOM_RECIPIENTS = ['lead@plant.test', 'maker@plant.test'];
export const PLANNER = 'planner@plant.test';

export interface Plant {
	dieIds: Record<string, number>;
	taskIds: Record<string, number>;
}

/**
 * Dies (all aluminium A380, 125 000 shots expected life unless set):
 * - D-9001 stress relief at 93 % of 15 000 shots → coming up
 * - D-9002 surface inspection 31.5 days into 30 → due
 * - D-9003 stress relief at 133 % → overdue (part name with markup, to check escaping)
 * - D-9004 stress relief at 7 % → on track (a shot entry later pushes it to due)
 * - D-9005 92 % of its own 100 000-shot life, tasks on track → life 90 %
 * - D-9006 retired, overdue → never told
 * - D-9007 overdue but the task is switched off → never told
 */
export async function seedPlant(db: DB, now = NOW): Promise<Plant> {
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', 'A380')
		.executeTakeFirstOrThrow();
	const customer = await db
		.insertInto('customers')
		// No contact address: D-9005 at 92 % of its life would also be told to its owner, in a mail
		// of its own (tests/integration/owner-life-notices.test.ts). These tests count what the
		// plant's own staff hear.
		.values({ code: 'TESTCO', name: 'Testbury Castings Ltd', contact_email: null })
		.returning('id')
		.executeTakeFirstOrThrow();

	const users: [
		string,
		string,
		'admin' | 'toolroom_lead' | 'toolmaker' | 'scheduler',
		number,
		number
	][] = [
		['u-admin', 'admin@plant.test', 'admin', 1, 1],
		['u-lead', 'lead@plant.test', 'toolroom_lead', 1, 1],
		['u-maker', 'maker@plant.test', 'toolmaker', 1, 1],
		['u-quiet', 'quiet@plant.test', 'toolmaker', 1, 0],
		['u-gone', 'gone@plant.test', 'toolmaker', 0, 1],
		['u-plan', PLANNER, 'scheduler', 1, 1]
	];
	for (const [id, email, role, active, notices] of users) {
		await db
			.insertInto('users')
			.values({
				id,
				email,
				name: email.split('@')[0],
				role,
				customer_id: null,
				password_hash: 'not-a-real-hash',
				active,
				notices_enabled: notices
			})
			.execute();
	}

	const dies: [string, string, number, number | null, 'ready' | 'retired'][] = [
		['D-9001', 'Pump housing', 14_000, null, 'ready'],
		['D-9002', 'Lamp bracket', 2_000, null, 'ready'],
		['D-9003', 'Valve <body> & "cap"', 20_000, null, 'ready'],
		['D-9004', 'Gear cover', 1_000, null, 'ready'],
		['D-9005', 'Motor end shield', 92_000, 100_000, 'ready'],
		['D-9006', 'Old flange', 30_000, null, 'retired'],
		['D-9007', 'Idle bracket', 30_000, null, 'ready']
	];
	const dieIds: Record<string, number> = {};
	for (const [number, part, shots, life, status] of dies) {
		const row = await db
			.insertInto('dies')
			.values({
				number,
				part_name: part,
				customer_id: customer.id,
				alloy_id: alloy.id,
				process: 'cold_chamber',
				cavities: 1,
				projected_area_cm2: 200,
				status,
				total_shots: shots,
				expected_life_shots: life,
				retired_at: status === 'retired' ? now : null
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		dieIds[number] = row.id;
	}

	const longAgo = at(now, -days(5));
	const tasks: [string, string, string, number | null, number | null, string, number, number][] = [
		['D-9001', 'sr', 'stress_relief', 15_000, null, longAgo, 0, 1],
		['D-9002', 'si', 'surface_inspection', null, 30, at(now, -days(31.5)), 0, 1],
		['D-9003', 'sr', 'stress_relief', 15_000, null, longAgo, 0, 1],
		['D-9004', 'sr', 'stress_relief', 15_000, null, longAgo, 0, 1],
		['D-9005', 'sr', 'stress_relief', 15_000, null, longAgo, 91_000, 1],
		['D-9006', 'sr', 'stress_relief', 15_000, null, longAgo, 0, 1],
		['D-9007', 'sr', 'stress_relief', 15_000, null, longAgo, 0, 0]
	];
	const taskIds: Record<string, number> = {};
	for (const [die, short, kind, shots, daysInterval, lastDone, lastShots, active] of tasks) {
		const row = await db
			.insertInto('service_tasks')
			.values({
				die_id: dieIds[die],
				kind,
				interval_shots: shots,
				interval_days: daysInterval,
				last_done_at: lastDone,
				last_done_shots: lastShots,
				active
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		taskIds[`${die}:${short}`] = row.id;
	}
	return { dieIds, taskIds };
}

/** Messages addressed to one recipient. */
export function mailFor(messages: StoredMessage[], email: string): StoredMessage[] {
	return messages.filter((m) => m.to.includes(email));
}

/** Die numbers named in a message's text part, in order of appearance. */
export function diesIn(message: StoredMessage): string[] {
	return [...message.text.matchAll(/^- (D-\d{4}) /gm)].map((m) => m[1]);
}

/** A local port nothing listens on: bind one, note it, release it. */
export async function closedPort(): Promise<number> {
	const server = createServer();
	await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
	const { port } = server.address() as AddressInfo;
	await new Promise<void>((resolve) => server.close(() => resolve()));
	return port;
}

/** Counts of outbox rows by state. */
export async function deliveryStates(db: DB): Promise<Record<string, number>> {
	const rows = await db
		.selectFrom('notice_deliveries')
		.select(['state', (eb) => eb.fn.countAll<number>().as('n')])
		.groupBy('state')
		.execute();
	return Object.fromEntries(rows.map((r) => [r.state, Number(r.n)]));
}

/**
 * After any number of runs of the job over `seedPlant`'s plant: each toolroom recipient got one
 * digest naming the four dies that stand (overdue D-9003, due D-9002, coming up D-9001, life 90 %
 * D-9005), and the outbox holds 4 notices × 2 recipients, all sent, in one digest each.
 */
export async function expectToolroomToldOnce(db: DB, messages: StoredMessage[]) {
	expect(messages).toHaveLength(TOOLROOM_RECIPIENTS.length);
	for (const email of TOOLROOM_RECIPIENTS) {
		const digests = mailFor(messages, email);
		expect(digests).toHaveLength(1);
		expect(diesIn(digests[0])).toEqual(['D-9003', 'D-9002', 'D-9001', 'D-9005']);
	}
	const notices = await db.selectFrom('notices').select('notice_key').execute();
	expect(notices).toHaveLength(4);
	expect(await deliveryStates(db)).toEqual({ sent: 8 });
	const digests = await db.selectFrom('notice_digests').select('recipient').execute();
	expect(digests.map((d) => d.recipient).sort()).toEqual(TOOLROOM_RECIPIENTS);
}
