import { beforeEach, describe, expect, test } from 'vitest';
import { testEngine, type DB } from '../../src/lib/server/db/connect';
import { describeStateChanges, moveDieState } from '../../src/lib/server/dies/state-change';
import { describeEntry } from '../../src/lib/server/notices/digest';
import type { NoticePayload } from '../../src/lib/server/notices/types';
import { dieId, openScheduleDb, PLANNER } from './schedule-support';

// Issue 13, item 3: the die page says what a state change does to the press bookings before the
// move ("3 press bookings from 12-11 will be blocked") and the planners are told afterwards.

let db: DB;

async function book(number: string, startsAt: string, endsAt: string, cancelled = false) {
	const machine = await db.selectFrom('machines').select('id').executeTakeFirstOrThrow();
	await db
		.insertInto('press_bookings')
		.values({
			die_id: await dieId(db, number),
			machine_id: machine.id,
			starts_at: startsAt,
			ends_at: endsAt,
			order_ref: `PO-${startsAt.slice(0, 10)}`,
			parts: 1000,
			shots_per_hour: 100,
			created_by: PLANNER,
			created_at: '2026-01-01T00:00:00.000Z',
			cancelled_at: cancelled ? '2026-01-02T00:00:00.000Z' : null
		})
		.execute();
}

async function die(number: string) {
	return db
		.selectFrom('dies')
		.select(['id', 'number', 'status'])
		.where('number', '=', number)
		.executeTakeFirstOrThrow();
}

beforeEach(async () => {
	db = await openScheduleDb();
	// Z-1 (ready): three coming bookings from 2098-12-11, one cancelled, one long over.
	await book('Z-1', '2098-12-11T06:00:00.000Z', '2098-12-11T14:00:00.000Z');
	await book('Z-1', '2098-12-12T06:00:00.000Z', '2098-12-12T14:00:00.000Z');
	await book('Z-1', '2098-12-20T06:00:00.000Z', '2098-12-21T14:00:00.000Z');
	await book('Z-1', '2098-12-05T06:00:00.000Z', '2098-12-05T14:00:00.000Z', true);
	await book('Z-1', '2020-01-05T06:00:00.000Z', '2020-01-05T14:00:00.000Z');
	// HELD-1 (held): one coming booking.
	await book('HELD-1', '2098-11-02T06:00:00.000Z', '2098-11-02T10:00:00.000Z');
	// The planner wants notices.
	await db.updateTable('users').set({ notices_enabled: 1 }).where('id', '=', PLANNER).execute();
});

describe('describeStateChanges', () => {
	test('says which coming bookings a move blocks, frees or leaves alone', async () => {
		const z = await die('Z-1');
		const said = await describeStateChanges(db, z, ['held', 'in_toolroom', 'running', 'retired']);
		const by = Object.fromEntries(said.map((c) => [c.to, c]));
		// 3 bookings: the cancelled one and the one that ended in 2020 do not count.
		expect(by.held.lines).toEqual([
			'3 press bookings from 2098-12-11 will be blocked.',
			'The production planners are told by e-mail.'
		]);
		expect(by.held.blocked).toBe(3);
		expect(by.in_toolroom.blocked).toBe(3);
		expect(by.running).toMatchObject({ blocked: 0, changesBooking: false, lines: [] });
		expect(by.retired.lines).toContain('Retiring is final: the die cannot change state again.');

		const held = await die('HELD-1');
		const [ready] = await describeStateChanges(db, held, ['ready']);
		expect(ready.lines[0]).toBe('1 press booking from 2098-11-02 can run again.');
		expect(ready.blocked).toBe(0);
		expect(ready.changesBooking).toBe(true);
	});

	test('a die without coming bookings says it cannot be booked while held', async () => {
		const a = await die('A-1');
		const [held] = await describeStateChanges(db, a, ['held']);
		expect(held.lines[0]).toBe(
			'No press booking is coming up; the die cannot be booked while Held.'
		);
	});
});

describe('moveDieState', () => {
	test('moves the die and queues one outbox item for the planners with the same words', async () => {
		const z = await die('Z-1');
		const result = await moveDieState(db, z, 'held', 'Porosity on the gate side', PLANNER, 3);
		expect(result.ok).toBe(true);
		expect((await die('Z-1')).status).toBe('held');
		const notices = await db.selectFrom('notices').selectAll().execute();
		expect(notices).toHaveLength(1);
		expect(notices[0]).toMatchObject({
			kind: 'die_state',
			level: 'not_bookable',
			subject: 'Z-1 moved to Held · cannot be booked'
		});
		const payload = JSON.parse(notices[0].payload) as NoticePayload;
		expect(describeEntry(payload)).toBe(
			'Moved to Held: Porosity on the gate side. 3 press bookings from 2098-12-11 will be blocked.'
		);
		const deliveries = await db.selectFrom('notice_deliveries').select('recipient').execute();
		expect(deliveries.map((d) => d.recipient)).toEqual(['p@p.test']);
	});

	test('a booking that came in after the page was opened stops the move until it is seen', async () => {
		const z = await die('Z-1');
		const result = await moveDieState(db, z, 'in_toolroom', 'Cracked core', PLANNER, 2);
		expect(result.ok).toBe(false);
		if (!result.ok) expect(result.message).toContain('3 press bookings from 2098-12-11');
		expect((await die('Z-1')).status).toBe('ready');
		expect(await db.selectFrom('notices').selectAll().execute()).toHaveLength(0);
	});

	test('a move that does not change whether the die can be booked tells nobody', async () => {
		const z = await die('Z-1');
		const result = await moveDieState(db, z, 'running', 'On the press', PLANNER, 0);
		expect(result).toMatchObject({ ok: true, queued: 0 });
		expect(await db.selectFrom('notices').selectAll().execute()).toHaveLength(0);
	});

	test('freeing a held die tells the planners it can be booked again', async () => {
		const held = await die('HELD-1');
		const result = await moveDieState(db, held, 'ready', 'Owner approved', PLANNER, 0);
		expect(result).toMatchObject({ ok: true, queued: 1 });
		const n = await db.selectFrom('notices').selectAll().executeTakeFirstOrThrow();
		expect(n).toMatchObject({
			level: 'ready_again',
			subject: 'HELD-1 moved to Ready · can be booked again'
		});
	});
});

// Upgrades a SQLite plant database from an older schema; PostgreSQL databases start at the latest
// schema (nothing to upgrade), and every other test runs the migrations on PostgreSQL.
describe.skipIf(testEngine() === 'postgres')('migration 2026_12_03_1401_widen_notice_kinds', () => {
	test('a plant database upgrades in place: existing notices and their deliveries are kept', async () => {
		const { Migrator } = await import('kysely');
		const { migrations } = await import('../../migrations/index');
		const { openDatabase } = await import('../../src/lib/server/db/connect');
		const old = openDatabase(':memory:');
		const migrator = new Migrator({ db: old, provider: { getMigrations: async () => migrations } });
		const before = await migrator.migrateTo('2026_12_01_2340_create_invitations');
		expect(before.error).toBeUndefined();
		const c = await old
			.insertInto('customers')
			.values({ code: 'X', name: 'X' })
			.returning('id')
			.executeTakeFirstOrThrow();
		const alloy = await old.selectFrom('alloys').select('id').executeTakeFirstOrThrow();
		const d = await old
			.insertInto('dies')
			.values({
				number: 'D-0001',
				part_name: 'P',
				customer_id: c.id,
				alloy_id: alloy.id,
				process: 'cold_chamber',
				cavities: 1,
				projected_area_cm2: 10
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		const n = await old
			.insertInto('notices')
			.values({
				notice_key: 'svc:1',
				kind: 'service',
				level: 'due',
				die_id: d.id,
				subject: 'D-0001 · Stress relief · Due',
				payload: '{}',
				created_at: '2026-01-01T00:00:00.000Z'
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await old
			.insertInto('notice_deliveries')
			.values({
				notice_id: n.id,
				recipient: 'a@b.test',
				next_attempt_at: '2026-01-01T00:00:00.000Z',
				created_at: '2026-01-01T00:00:00.000Z'
			})
			.execute();
		// The old table refuses the new kind; the upgraded one takes it.
		const newItem = {
			notice_key: 'state:1',
			kind: 'die_state' as const,
			level: 'not_bookable' as const,
			die_id: d.id,
			subject: 's',
			payload: '{}',
			created_at: '2026-01-02T00:00:00.000Z'
		};
		await expect(old.insertInto('notices').values(newItem).execute()).rejects.toThrow(/CHECK/);
		const after = await migrator.migrateToLatest();
		expect(after.error).toBeUndefined();
		expect(await old.selectFrom('notices').select(['id', 'notice_key']).execute()).toEqual([
			{ id: n.id, notice_key: 'svc:1' }
		]);
		expect(
			await old.selectFrom('notice_deliveries').select(['notice_id', 'recipient']).execute()
		).toEqual([{ notice_id: n.id, recipient: 'a@b.test' }]);
		await old.insertInto('notices').values(newItem).execute();
		// Foreign keys are back on and still point at the rebuilt table.
		await expect(
			old
				.insertInto('notice_deliveries')
				.values({
					notice_id: 9999,
					recipient: 'x@b.test',
					next_attempt_at: '2026-01-01T00:00:00.000Z',
					created_at: '2026-01-01T00:00:00.000Z'
				})
				.execute()
		).rejects.toThrow(/FOREIGN KEY/);
		// Deleting an item still removes its deliveries (ON DELETE CASCADE survives).
		await old.deleteFrom('notices').where('id', '=', n.id).execute();
		expect(await old.selectFrom('notice_deliveries').selectAll().execute()).toEqual([]);
		await old.destroy();
	});
});
