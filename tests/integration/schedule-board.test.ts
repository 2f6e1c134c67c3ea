import { beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { boardQuerySchema } from '../../src/lib/schemas/schedule';
import { listBookingsAtRisk } from '../../src/lib/server/schedule/at-risk';
import {
	BOARD_BOOKING_COLUMNS,
	BOARD_DIE_COLUMNS,
	loadBoard,
	startOfWeek
} from '../../src/lib/server/schedule/board';
import { bookingRefusal } from '../../src/lib/server/schedule/api';
import {
	createBooking,
	listBookingsInWindow,
	windowBounds
} from '../../src/lib/server/schedule/bookings';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import {
	actor,
	addTask,
	at,
	dieId,
	draft,
	NOW,
	openScheduleDb,
	runDaily
} from './schedule-support';

let db: DB;
beforeEach(async () => {
	db = await openScheduleDb();
});

const board = (q: Record<string, string> = {}) =>
	loadBoard(db, boardQuerySchema.parse(q), { customerId: null }, NOW);
const book = async (over: Parameters<typeof draft>[0] = {}) => {
	const r = await createBooking(db, draft(over), actor, { confirm: true, now: NOW });
	if (!r.ok) throw new Error(JSON.stringify(r));
	return r.id;
};

describe('board query shape', () => {
	test('compact tables: column names once, rows as arrays pointing at dies by index', async () => {
		const id = await book();
		const b = await board();
		expect(b.from).toBe('2027-03-01');
		expect(b.to).toBe('2027-03-29');
		expect(b.days).toBe(28);
		expect(b.today).toBe('2027-03-01');
		expect(b.dies.columns).toEqual(BOARD_DIE_COLUMNS);
		expect(b.bookings.columns).toEqual(BOARD_BOOKING_COLUMNS);
		// Retired dies are not on the board; the rest in number order.
		expect(b.dies.rows.map((r) => r[0])).toEqual([
			'A-1',
			'BIG-1',
			'CU-1',
			'HELD-1',
			'MG-1',
			'TR-1',
			'Z-1',
			'ZC-1'
		]);
		const z = b.dies.rows.findIndex((r) => r[0] === 'Z-1');
		expect(b.dies.rows[z]).toEqual(['Z-1', 'Part Z-1', 'ACME', 'zinc', 'ready', 20]);
		// The run's verdict and first reason close the row: 4000 parts / 2 cavities = 2000 shots at
		// 300 /h = 6.7 h inside a 16 h booking on a free hot-chamber press, Z-1 with no service
		// task and 20 % of its life used: fits, nothing to say.
		expect(b.bookings.rows).toEqual([
			[id, z, 'HC-20', at(7, 6), at(7, 22), 'PO-1', 4000, 'planned', 'fits', null]
		]);
	});

	test('the default window starts on the Monday of this week', () => {
		expect(startOfWeek('2027-03-03T09:00:00.000Z')).toBe('2027-03-01');
		expect(startOfWeek('2027-03-07T23:00:00.000Z')).toBe('2027-03-01');
		expect(startOfWeek('2027-03-08T00:00:00.000Z')).toBe('2027-03-08');
	});

	test('spans of 14, 28 or 56 days; anything else falls back to 28', async () => {
		expect((await board({ days: '14' })).to).toBe('2027-03-15');
		expect((await board({ days: '56' })).to).toBe('2027-04-26');
		expect((await board({ days: '1000' })).days).toBe(28);
	});

	test('bookings outside the window and cancelled ones are left out', async () => {
		await book({ startsAt: at(40, 6), endsAt: at(40, 22), orderRef: 'LATER' });
		const r = await createBooking(db, draft({ orderRef: 'GONE' }), actor, {
			confirm: true,
			now: NOW
		});
		if (!r.ok) throw new Error('not booked');
		await db
			.updateTable('press_bookings')
			.set({ cancelled_at: NOW })
			.where('id', '=', r.id)
			.execute();
		expect((await board()).bookings.rows).toEqual([]);
		expect((await board({ days: '56' })).bookings.rows.map((b) => b[5])).toEqual(['LATER']);
	});

	test('filters by owner, alloy family and press (dies that fit the press)', async () => {
		expect((await board({ owner: 'BOLT' })).dies.rows.map((r) => r[0])).toEqual(['BIG-1']);
		expect((await board({ family: 'zinc' })).dies.rows.map((r) => r[0])).toEqual([
			'HELD-1',
			'TR-1',
			'Z-1',
			'ZC-1'
		]);
		// CC-40 (cold, 3 923 kN): cold-chamber dies whose requirement it meets; A-1 needs 4 500 kN
		// (600 cm² × 600 bar / 100 × 1.25 with slides), BIG-1 9 240 kN.
		const cc40 = await board({ press: 'CC-40' });
		expect(cc40.press).toEqual({ name: 'CC-40', chamber: 'cold', clampKn: 3923 });
		expect(cc40.dies.rows.map((r) => r[0])).toEqual(['CU-1', 'MG-1', 'ZC-1']);
		expect((await board({ press: 'CC-160' })).dies.rows.map((r) => r[0])).toEqual([
			'A-1',
			'BIG-1',
			'CU-1',
			'MG-1',
			'ZC-1'
		]);
		expect((await board({ press: 'HC-20' })).dies.rows.map((r) => r[0])).toEqual([
			'HELD-1',
			'TR-1',
			'Z-1'
		]);
	});

	test('a customer-bound caller sees only its own dies and their bookings', async () => {
		await book();
		const bolt = (
			await db
				.selectFrom('customers')
				.select('id')
				.where('code', '=', 'BOLT')
				.executeTakeFirstOrThrow()
		).id;
		const b = await loadBoard(db, boardQuerySchema.parse({}), { customerId: bolt }, NOW);
		expect(b.dies.rows.map((r) => r[0])).toEqual(['BIG-1']);
		expect(b.bookings.rows).toEqual([]);
	});

	test('projected service due dates at the trailing rate; already due shows today', async () => {
		await runDaily(db, 'Z-1', 500);
		// 5 000 shots left at 500 a day: due in 10 days.
		await addTask(db, 'Z-1', { kind: 'stress_relief', intervalShots: 25_000, leftShots: 5_000 });
		await addTask(db, 'A-1', { kind: 'cooling_flush', intervalDays: 90, daysAgo: 95 });
		await addTask(db, 'MG-1', { kind: 'teardown', intervalShots: 50_000, leftShots: 40_000 });
		const b = await board();
		const idx = (n: string) => b.dies.rows.findIndex((r) => r[0] === n);
		expect(b.service.rows).toContainEqual([idx('Z-1'), '2027-03-11', 'stress_relief', 'on_track']);
		expect(b.service.rows).toContainEqual([idx('A-1'), '2027-03-01', 'cooling_flush', 'due']);
		// MG-1 has not run recently: no shot-based projection.
		expect(b.service.rows.filter((r) => r[0] === idx('MG-1'))).toEqual([]);
	});

	test('open toolroom jobs appear on their die', async () => {
		await db
			.insertInto('toolroom_jobs')
			.values({
				number: 'TJ-00042',
				die_id: await dieId(db, 'TR-1'),
				kind: 'repair',
				half: 'both',
				description: 'Weld repair',
				source: 'die',
				die_shots_at_open: 0,
				opened_at: '2027-02-26T07:00:00.000Z',
				updated_at: '2027-02-26T07:00:00.000Z'
			})
			.execute();
		const b = await board();
		const idx = b.dies.rows.findIndex((r) => r[0] === 'TR-1');
		expect(b.jobs.rows).toEqual([[idx, 'TJ-00042', 'repair', 'open', '2027-02-26T07:00:00.000Z']]);
	});
});

describe('bookings in a window', () => {
	test('a booking ending exactly at the window start, or starting at its end, is outside', async () => {
		await book({ startsAt: at(6, 0), endsAt: at(7, 0), orderRef: 'BEFORE' });
		await book({ startsAt: at(7, 0), endsAt: at(7, 12), orderRef: 'IN' });
		await book({ startsAt: at(8, 0), endsAt: at(8, 12), orderRef: 'AFTER' });
		const { start, end } = windowBounds('2027-03-08', '2027-03-08');
		const rows = await listBookingsInWindow(db, { start, end }, { customerId: null });
		expect(rows.map((r) => r.order_ref)).toEqual(['IN']);
	});

	test('a long booking that started weeks before the window still shows', async () => {
		await book({ startsAt: at(-20, 0), endsAt: at(30, 0), orderRef: 'LONG', parts: 400_000 });
		const { start, end } = windowBounds('2027-03-10', '2027-03-11');
		const rows = await listBookingsInWindow(db, { start, end }, { customerId: null });
		expect(rows.map((r) => r.order_ref)).toEqual(['LONG']);
	});
});

describe('planned runs before the start', () => {
	test('shots of the die’s earlier bookings count when larger than its recent pace', async () => {
		// 4 000 parts on 2 cavities = 2 000 shots on day 2.
		await book({ startsAt: at(2, 6), endsAt: at(2, 22) });
		const ev = await judgeRun(
			db,
			draft({ startsAt: at(7, 6), endsAt: at(7, 22), orderRef: 'PO-2' }),
			{ now: NOW }
		);
		expect(ev.ok && ev.shotsBeforeStart).toBe(2000);
	});
});

describe('planner: booked orders blocked or at risk', () => {
	test('a booked die that has since gone to the toolroom is listed as blocked, first', async () => {
		await addTask(db, 'A-1', { kind: 'stress_relief', intervalShots: 15_000, leftShots: 100 });
		await book({
			die: 'A-1',
			press: 'CC-160',
			shotsPerHour: 100,
			parts: 500,
			startsAt: at(3, 6),
			endsAt: at(3, 22)
		});
		await book({ startsAt: at(5, 6), endsAt: at(5, 22) });
		await book({ startsAt: at(20, 6), endsAt: at(20, 22), orderRef: 'FAR' });
		expect((await listBookingsAtRisk(db, 14, NOW)).map((r) => r.booking.dieNumber)).toEqual([
			'A-1'
		]);
		await db
			.updateTable('dies')
			.set({ status: 'in_toolroom' })
			.where('number', '=', 'Z-1')
			.execute();
		const risk = await listBookingsAtRisk(db, 14, NOW);
		expect(
			risk.map((r) => [
				r.booking.dieNumber,
				r.blocks.map((b) => b.code),
				r.warnings.map((w) => w.code)
			])
		).toEqual([
			['Z-1', ['die_in_toolroom'], []],
			['A-1', [], ['service_due']]
		]);
	});
});

describe('API answers for refused bookings', () => {
	test('422 for a block, 409 listing the warnings, 400 for an unknown die', async () => {
		const blocked = await createBooking(db, draft({ die: 'HELD-1' }), actor, {
			confirm: false,
			now: NOW
		});
		if (blocked.ok) throw new Error('booked');
		const e422 = bookingRefusal(blocked);
		expect(e422.status).toBe(422);
		expect(e422.message).toMatch(/^The booking is refused: HELD-1 is held/);
		expect(e422.issues).toEqual([
			{ field: 'die_held', message: expect.stringMatching(/^HELD-1 is held/) }
		]);

		const warned = await createBooking(db, draft({ shotsPerHour: 120, endsAt: at(8, 22) }), actor, {
			confirm: false,
			now: NOW
		});
		if (warned.ok) throw new Error('booked');
		const e409 = bookingRefusal(warned);
		expect(e409.status).toBe(409);
		expect(e409.issues?.map((i) => i.field)).toEqual(['rate_unusual']);

		const unknown = await createBooking(db, draft({ die: 'D-9999' }), actor, {
			confirm: false,
			now: NOW
		});
		if (unknown.ok) throw new Error('booked');
		expect(bookingRefusal(unknown)).toMatchObject({
			status: 400,
			message: 'There is no die D-9999.'
		});
	});
});
