// Every bar on the board carries the one verdict, the same the booking's own page (judgeRun)
// gives; service windows are on the board for the plant and hidden from tooling owners.
import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { boardQuerySchema } from '../../src/lib/schemas/schedule';
import { boardViewFor } from '../../src/lib/server/owner/customer-fields';
import { loadBoard } from '../../src/lib/server/schedule/board';
import { createBooking } from '../../src/lib/server/schedule/bookings';
import { reserveServiceWindow } from '../../src/lib/server/schedule/service-windows';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import { actor, addTask, at, draft, NOW, openScheduleDb, PLANNER } from './schedule-support';

let db: DB;
beforeEach(async () => {
	db = await openScheduleDb();
});
afterEach(async () => {
	await db.destroy();
});

const board = (scope: { customerId: number | null } = { customerId: null }) =>
	loadBoard(db, boardQuerySchema.parse({}), scope, NOW);

async function book(over: Parameters<typeof draft>[0]) {
	const r = await createBooking(db, draft(over), actor, { confirm: true, now: NOW });
	if (!r.ok) throw new Error(JSON.stringify(r));
	return r.id;
}

describe('verdict on every bar', () => {
	test('fits, warning and blocked bars, each equal to the booking’s own verdict', async () => {
		// FIT: Z-1 on HC-20, nothing due. Booked Mon 8 Mar 06:00–22:00 (16 h); 4000 parts / 2
		// cavities = 2000 shots at 300 /h = 6 h 40 min, after HC-20's 30 + 30 min change-over:
		// 06:00 + 0:30 + 0:30 + 6:40 = 13:40, well inside the window, so not too short.
		const fit = await book({ orderRef: 'FIT' });
		// WARN: A-1 on CC-160; its 30-day cooling flush was done 25 days ago, so it falls due on
		// day 5 (plant midnight + 30 d), inside a run on days 4–6 (500 shots at 100 /h = 5 h after
		// CC-160's 90 + 60 min: 06:00 + 1:30 + 1:00 + 5:00 = 13:30 on day 4, in the 48 h booked).
		await addTask(db, 'A-1', { kind: 'cooling_flush', intervalDays: 30, daysAgo: 25 });
		const warn = await book({
			die: 'A-1',
			press: 'CC-160',
			startsAt: at(4, 6),
			endsAt: at(6, 6),
			parts: 500,
			shotsPerHour: 100,
			orderRef: 'WARN'
		});
		// BLOCKED: MG-1 booked on CC-40, then moved into the toolroom after booking (500 shots at
		// 100 /h: 06:00 + 1:30 + 1:00 + 5:00 = 13:30, inside the 06:00–22:00 booking).
		const blocked = await book({
			die: 'MG-1',
			press: 'CC-40',
			startsAt: at(9, 6),
			endsAt: at(9, 22),
			parts: 500,
			shotsPerHour: 100,
			orderRef: 'BLOCK'
		});
		await db
			.updateTable('dies')
			.set({ status: 'in_toolroom' })
			.where('number', '=', 'MG-1')
			.execute();

		const b = await board();
		const byOrder = new Map(b.bookings.rows.map((r) => [r[5], r]));
		expect(byOrder.get('FIT')?.slice(8)).toEqual(['fits', null]);
		expect(byOrder.get('WARN')?.[8]).toBe('warning');
		expect(byOrder.get('WARN')?.[9]).toContain('Cooling-line flush comes due during this run');
		expect(byOrder.get('BLOCK')?.[8]).toBe('blocked');
		expect(byOrder.get('BLOCK')?.[9]).toContain('MG-1 is in the toolroom');

		// The same answers as the one judge asked booking by booking.
		for (const [id, order] of [
			[fit, 'FIT'],
			[warn, 'WARN'],
			[blocked, 'BLOCK']
		] as const) {
			const row = await db
				.selectFrom('press_bookings')
				.innerJoin('dies', 'dies.id', 'press_bookings.die_id')
				.innerJoin('machines', 'machines.id', 'press_bookings.machine_id')
				.select([
					'dies.number',
					'machines.name',
					// Qualified: dies and machines have a shots_per_hour of their own (their usual
					// rate); the booking's planned rate is the one judged.
					'press_bookings.starts_at',
					'press_bookings.ends_at',
					'press_bookings.parts',
					'press_bookings.scrap_pct',
					'press_bookings.shots_per_hour'
				])
				.where('press_bookings.id', '=', id)
				.executeTakeFirstOrThrow();
			const ev = await judgeRun(
				db,
				{
					die: row.number,
					press: row.name,
					startsAt: row.starts_at,
					endsAt: row.ends_at,
					parts: row.parts,
					scrapPct: row.scrap_pct,
					shotsPerHour: row.shots_per_hour
				},
				{ now: NOW, excludeBookingId: id }
			);
			if (!ev.ok) throw new Error(ev.message);
			expect([order, byOrder.get(order)?.[8]]).toEqual([order, ev.verdict]);
			expect(byOrder.get(order)?.[9]).toBe(ev.reasons[0]?.message ?? null);
		}
	});

	test('an ended run carries no verdict', async () => {
		const id = await book({ startsAt: at(0, 1), endsAt: at(0, 7), orderRef: 'PAST' });
		const row = (await board()).bookings.rows.find((r) => r[0] === id);
		expect(row?.slice(7)).toEqual(['ended', null, null]);
	});
});

describe('service windows on the board', () => {
	test('the plant sees the window on its die; a tooling owner sees neither windows nor verdicts', async () => {
		const r = await reserveServiceWindow(
			db,
			{
				die: 'BIG-1',
				startsAt: at(3, 6),
				endsAt: at(3, 18),
				kind: 'teardown',
				note: 'Owner asked for a teardown'
			},
			{ userId: PLANNER, role: 'scheduler' },
			NOW
		);
		if (!r.ok) throw new Error(r.message);
		const plant = await board();
		const big = plant.dies.rows.findIndex((d) => d[0] === 'BIG-1');
		expect(plant.windows.rows).toEqual([
			[big, r.id, at(3, 6), at(3, 18), 'teardown', 'Owner asked for a teardown', null]
		]);

		await book({
			die: 'BIG-1',
			press: 'CC-160',
			startsAt: at(5, 6),
			endsAt: at(5, 22),
			parts: 100,
			shotsPerHour: 100,
			orderRef: 'BOLT-1'
		});
		const bolt = (
			await db
				.selectFrom('customers')
				.select('id')
				.where('code', '=', 'BOLT')
				.executeTakeFirstOrThrow()
		).id;
		const owner = boardViewFor('customer', await board({ customerId: bolt }));
		expect(owner.windows.rows).toEqual([]);
		expect(owner.bookings.columns).not.toContain('verdict');
		expect(owner.bookings.columns).not.toContain('why');
		// The owner still reads when each of its runs starts and ends (a bar needs both).
		expect(owner.bookings.columns).toEqual([
			'id',
			'die',
			'press',
			'start',
			'end',
			'parts',
			'phase'
		]);
		expect(owner.bookings.rows.length).toBeGreaterThan(0);
		for (const row of owner.bookings.rows) expect(row).toHaveLength(7);
		expect(JSON.stringify(owner)).not.toContain('Owner asked for a teardown');
	});
});
