// The next-free-slot finder on a hand-worked timeline. Every booking below is put straight into
// the table (no checks) so the timeline is exactly as written; the finder's answers come from the
// one verdict and are compared with slots worked out by hand.
import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { findFreeSlots } from '../../src/lib/server/schedule/free-slots';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import { at, dieId, NOW, openScheduleDb, PLANNER } from './schedule-support';

let db: DB;

async function book(die: string, press: string, start: string, end: string, order: string) {
	const machine = await db
		.selectFrom('machines')
		.select('id')
		.where('name', '=', press)
		.executeTakeFirstOrThrow();
	await db
		.insertInto('press_bookings')
		.values({
			die_id: await dieId(db, die),
			machine_id: machine.id,
			starts_at: start,
			ends_at: end,
			order_ref: order,
			parts: 100,
			scrap_pct: 0,
			shots_per_hour: 300,
			notes: null,
			created_by: PLANNER,
			created_at: NOW
		})
		.execute();
}

beforeEach(async () => {
	db = await openScheduleDb();
	// Three more hot-chamber presses (invented), each big enough for Z-1. Created without a
	// change-over of their own, so they take the migration's default: 90 min die change + 60 min
	// preheat = 2 h 30 min before the first shot (HC-20 has 30 + 30 min = 1 h, schedule-support).
	await db
		.insertInto('machines')
		.values([
			{ name: 'HC-30', chamber: 'hot', clamp_force_kn: 2942, status: 'available' },
			{ name: 'HC-42', chamber: 'hot', clamp_force_kn: 4119, status: 'available' },
			{ name: 'HC-50', chamber: 'hot', clamp_force_kn: 4903, status: 'available' }
		])
		.execute();
	await db.updateTable('dies').set({ part_number: 'P-100' }).where('number', '=', 'Z-1').execute();
	// The timeline, Tuesday 2 March 2027 (UTC):
	//   Z-1 service window            05:00–09:00
	//   HC-20  TR-1 bookings          04:00–12:00, 18:00–Wed 02:00
	//   HC-30  HELD-1 booking         09:00–10:30
	//   HC-42  free
	//   HC-50  HELD-1 booking         08:00–Wed 06:00
	await db
		.insertInto('service_windows')
		.values({
			die_id: await dieId(db, 'Z-1'),
			starts_at: at(1, 5),
			ends_at: at(1, 9),
			kind: 'cooling_flush',
			note: null,
			created_by: PLANNER,
			created_at: NOW
		})
		.execute();
	await book('TR-1', 'HC-20', at(1, 4), at(1, 12), 'PO-A');
	await book('TR-1', 'HC-20', at(1, 18), at(2, 2), 'PO-B');
	await book('HELD-1', 'HC-30', at(1, 9), at(1, 10.5), 'PO-C');
	await book('HELD-1', 'HC-50', at(1, 8), at(2, 6), 'PO-D');
});
afterEach(async () => {
	await db.destroy();
});

// The order: 4000 parts, Z-1 has 2 cavities, 0 % scrap → 2000 shots; at 250 shots/h that is
// 2000 / 250 = 8 h of press time. A run is start + die change + preheat + press hours:
//   HC-20:               start + 0:30 + 0:30 + 8:00 = start +  9:00
//   HC-30, HC-42, HC-50: start + 1:30 + 1:00 + 8:00 = start + 10:30
// Earliest start Tuesday 06:00.
const order = {
	die: 'Z-1',
	parts: 4000,
	scrapPct: 0,
	shotsPerHour: 250,
	earliest: at(1, 6)
};

describe('free-slot finder', () => {
	test('the first three slots on the hand-worked timeline', async () => {
		// By hand, per press (a slot can open only when something ends):
		//   HC-42: 06:00 hits the window (ends 09:00) → 09:00 + 2:30 + 8:00 = 19:30, free.
		//   HC-30: 06:00 window; 09:00–19:30 hits PO-C (09:00–10:30) →
		//          10:30 + 2:30 + 8:00 = 21:00, free.
		//   HC-20: 06:00 window; 09:00 hits PO-A (04:00–12:00); 12:00 + 1:00 + 8:00 = 21:00 hits
		//          PO-B (18:00) → Wed 02:00 + 1:00 + 8:00 = Wed 11:00, free.
		//   HC-50: 06:00, 09:00 inside PO-D → Wed 06:00 + 10:30 = Wed 16:30 (fourth; left out).
		//   CC-40, CC-160, CC-84: cold chamber — Z-1 is a hot-chamber die; never.
		const answer = await findFreeSlots(db, order, { now: NOW });
		if (!answer.ok) throw new Error(answer.message);
		expect(answer.asked.slots.map((s) => [s.press, s.startsAt, s.endsAt, s.verdict])).toEqual([
			['HC-42', at(1, 9), at(1, 19.5), 'fits'],
			['HC-30', at(1, 10.5), at(1, 21), 'fits'],
			['HC-20', at(2, 2), at(2, 11), 'fits']
		]);
		expect(answer.asked.refused.map((r) => r.press).sort()).toEqual(['CC-160', 'CC-40', 'CC-84']);
		expect(answer.sisters).toEqual([]);
	});

	test('each slot carries the verdict the order check gives for it', async () => {
		const answer = await findFreeSlots(db, order, { now: NOW });
		if (!answer.ok) throw new Error(answer.message);
		for (const s of answer.asked.slots) {
			const ev = await judgeRun(
				db,
				{ ...order, press: s.press, startsAt: s.startsAt },
				{ now: NOW }
			);
			if (!ev.ok) throw new Error(ev.message);
			expect([ev.verdict, ev.endsAt]).toEqual([s.verdict, s.endsAt]);
		}
	});

	test('a warning does not hide a slot: a rate outside the zinc range still finds 09:00', async () => {
		// 600 shots/h is above the usual 200–550 for zinc (NADCA, as in the verdict): a warning.
		// 2000 shots / 600 per h = 3 h 20 min of press time.
		//   HC-42: 09:00 + 2:30 + 3:20 = 14:50.
		//   HC-30: 09:00 + 5:50 = 14:50 hits PO-C (09:00–10:30) → 10:30 + 2:30 + 3:20 = 16:20.
		//   HC-20: 09:00 hits PO-A; 12:00 + 1:00 + 3:20 = 16:20, before PO-B starts at 18:00.
		const answer = await findFreeSlots(db, { ...order, shotsPerHour: 600 }, { now: NOW });
		if (!answer.ok) throw new Error(answer.message);
		expect(answer.asked.slots.map((s) => [s.press, s.startsAt, s.endsAt, s.verdict])).toEqual([
			['HC-42', at(1, 9), '2027-03-02T14:50:00.000Z', 'warning'],
			['HC-30', at(1, 10.5), '2027-03-02T16:20:00.000Z', 'warning'],
			['HC-20', at(1, 12), '2027-03-02T16:20:00.000Z', 'warning']
		]);
		expect(answer.asked.slots[0].warnings.map((w) => w.code)).toEqual(['rate_unusual']);
	});

	test('a held die has no slot, so its sister die of the same part number is offered', async () => {
		await db.updateTable('dies').set({ status: 'held' }).where('number', '=', 'Z-1').execute();
		// Z-2: a second die for part P-100 (same alloy and size), and a retired one that must not
		// be offered.
		const z1 = await db
			.selectFrom('dies')
			.selectAll()
			.where('number', '=', 'Z-1')
			.executeTakeFirstOrThrow();
		const { id: _id, ...rest } = z1;
		await db
			.insertInto('dies')
			.values([
				{ ...rest, number: 'Z-2', status: 'ready', total_shots: 0 },
				{ ...rest, number: 'Z-9', status: 'retired', total_shots: 0 }
			])
			.execute();
		const answer = await findFreeSlots(db, order, { now: NOW });
		if (!answer.ok) throw new Error(answer.message);
		expect(answer.asked.slots).toEqual([]);
		expect(answer.asked.refused[0].message).toContain('Z-1 is held');
		// Z-2 has no window: HC-42 06:00 + 2:30 + 8:00 = 16:30; HC-30 06:00–16:30 hits PO-C →
		// 10:30 + 10:30 = 21:00; HC-20 06:00 + 9:00 = 15:00 hits PO-A, 12:00 + 9:00 = 21:00 hits
		// PO-B → Wed 02:00 + 9:00 = Wed 11:00; HC-50 06:00 hits PO-D → Wed 06:00 (fourth).
		expect(answer.sisters.map((s) => s.die)).toEqual(['Z-2']);
		expect(answer.sisters[0].slots.map((s) => [s.press, s.startsAt, s.endsAt, s.verdict])).toEqual([
			['HC-42', at(1, 6), at(1, 16.5), 'fits'],
			['HC-30', at(1, 10.5), at(1, 21), 'fits'],
			['HC-20', at(2, 2), at(2, 11), 'fits']
		]);
	});

	test('an earliest start in the past means now; an unknown die is a field message', async () => {
		const answer = await findFreeSlots(
			db,
			{ ...order, die: 'A-1', parts: 100, shotsPerHour: 100, earliest: at(-3) },
			{ now: NOW }
		);
		if (!answer.ok) throw new Error(answer.message);
		// A-1 (aluminium, cold chamber, 600 cm² with slides) needs 600 cm² × 600 bar (family
		// default, calc/clamp) / 100 × 1.25 = 4500 kN: CC-40 (3923 kN) is too small, CC-84 is down,
		// so CC-160 alone, free now: 100 parts, 1 cavity, 0 % scrap = 100 shots / 100 per h = 1 h
		// of press time after CC-160's 90 min die change + 60 min preheat, from NOW (Mon 08:00):
		// 08:00 + 1:30 + 1:00 + 1:00 = 11:30.
		expect(answer.asked.slots.map((s) => [s.press, s.startsAt, s.endsAt])).toEqual([
			['CC-160', NOW, at(0, 11.5)]
		]);
		const cc40 = answer.asked.refused.find((r) => r.press === 'CC-40');
		expect(cc40?.message).toContain('needs at least 4,500 kN');
		expect(await findFreeSlots(db, { ...order, die: 'X-404' }, { now: NOW })).toEqual({
			ok: false,
			field: 'die',
			message: 'There is no die X-404.'
		});
	});
});
