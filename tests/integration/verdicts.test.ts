// The one verdict (lib/server/schedule/verdict.ts): the cases a planner must never see wrong.
import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { CLAMP_CAUTION } from '../../src/lib/labels';
import { runOrderCheck } from '../../src/lib/server/schedule/order-check';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import { addTask, at, dieId, NOW, openScheduleDb } from './schedule-support';

let db: DB;
beforeEach(async () => {
	db = await openScheduleDb();
});
afterEach(async () => {
	await db.destroy();
});

async function judge(draft: Parameters<typeof judgeRun>[1]) {
	const ev = await judgeRun(db, draft, { now: NOW });
	if (!ev.ok) throw new Error(ev.message);
	return ev;
}

describe('die status', () => {
	test('a retired die is blocked, whatever the order', async () => {
		const ev = await judge({ die: 'RET-1', parts: 1, scrapPct: 0, press: 'CC-160' });
		expect(ev.verdict).toBe('blocked');
		expect(ev.reasons[0]).toMatchObject({ code: 'die_retired', level: 'block' });
	});

	test('a die in the toolroom is blocked until its job is closed, with the expected release date', async () => {
		await db
			.insertInto('toolroom_jobs')
			.values({
				number: 'TJ-00031',
				die_id: await dieId(db, 'TR-1'),
				kind: 'repair',
				half: 'cover',
				description: 'Weld the gate-side heat checks',
				source: 'die',
				die_shots_at_open: 0,
				opened_at: '2027-02-26T10:00:00.000Z',
				updated_at: '2027-02-26T10:00:00.000Z',
				expected_release_at: '2027-03-04T14:00:00.000Z'
			})
			.execute();
		const ev = await judge({ die: 'TR-1', parts: 10, scrapPct: 0, startsAt: at(10) });
		expect(ev.verdict).toBe('blocked');
		// Release 2027-03-04 14:00 from now (2027-03-01 08:00): 3 d 6 h, rounded up to 4 days.
		expect(ev.reasons).toMatchObject([{ code: 'die_in_toolroom', level: 'block', number: 4 }]);
		expect(ev.reasons[0].message).toContain('Open toolroom job: TJ-00031.');
		expect(ev.reasons[0].message).toContain('Expected release: 2027-03-04.');
	});
});

describe('service tasks by shots or by days', () => {
	test('a day-based task overdue by 14 months is not a fit', async () => {
		// Cooling flush every 30 days, last done 425 days before NOW (08:00): due at plant midnight of
		// the done date + 30 days, i.e. 395 days and 8 hours ago — rounded down, -396 days.
		await addTask(db, 'Z-1', { kind: 'cooling_flush', intervalDays: 30, daysAgo: 425 });
		const ev = await judge({ die: 'Z-1', parts: 100, scrapPct: 0, press: 'HC-20' });
		expect(ev.verdict).toBe('warning');
		expect(ev.reasons).toMatchObject([{ code: 'service_due', level: 'warn', number: -396 }]);
		expect(ev.reasons[0].message).toMatch(/^Cooling-line flush is due before this run starts/);
	});

	test('with the same die and no task due, 100 parts fit', async () => {
		const ev = await judge({ die: 'Z-1', parts: 100, scrapPct: 0, press: 'HC-20' });
		expect(ev).toMatchObject({ verdict: 'fits', reasons: [] });
	});
});

describe('clamping force from the die’s own metal pressure', () => {
	// BIG-1: 1 400 cm², no slides (k = 1.1, Giesserei-Lexikon); CC-160 clamps 15 691 kN.
	//   at  600 bar: 1 400 × 600 / 100 = 8 400 kN × 1.1 =  9 240 kN → held shut;
	//   at 1 100 bar: 1 400 × 1 100 / 100 = 15 400 kN × 1.1 = 16 940 kN → too small.
	const order = { die: 'BIG-1', parts: 100, scrapPct: 0, press: 'CC-160', shotsPerHour: 100 };

	test('a die recorded at 600 bar fits the press', async () => {
		await db
			.updateTable('dies')
			.set({ metal_pressure_bar: 600 })
			.where('number', '=', 'BIG-1')
			.execute();
		const ev = await judge(order);
		expect(ev.clamp).toMatchObject({ metalPressureBar: 600, pressureIsDefault: false, fits: true });
		expect(ev.clamp.requiredKn).toBeCloseTo(9240, 6);
		expect(ev.verdict).toBe('fits');
	});

	test('the same die at 1 100 bar is blocked on that press, with the formula and the caution', async () => {
		await db
			.updateTable('dies')
			.set({ metal_pressure_bar: 1100 })
			.where('number', '=', 'BIG-1')
			.execute();
		const ev = await judge(order);
		expect(ev.verdict).toBe('blocked');
		expect(ev.clamp.requiredKn).toBeCloseTo(16_940, 6);
		expect(ev.reasons).toMatchObject([{ code: 'clamp_force', level: 'block', number: 16_940 }]);
		expect(ev.reasons[0].message).toContain(
			'1,400 cm² × 1,100 bar ÷ 100 × 1.1 (without slides) = 16,940 kN'
		);
		expect(ev.reasons[0].message).toContain(CLAMP_CAUTION);
		expect(CLAMP_CAUTION).toMatch(/molten metal spray from the parting line/);
		// The order-check page's answer carries the same verdict and formula.
		const page = await runOrderCheck(db, order, { customerId: null }, NOW);
		if (!page.ok) throw new Error(page.message);
		expect(page.answer.verdict).toBe('blocked');
		expect(page.answer.clamp.formula).toBe(
			'1,400 cm² × 1,100 bar ÷ 100 × 1.1 (without slides) = 16,940 kN'
		);
	});
});

describe('overlapping bookings', () => {
	test('a die already booked in the run’s window is blocked; after that booking it fits', async () => {
		await db
			.insertInto('press_bookings')
			.values({
				die_id: await dieId(db, 'Z-1'),
				machine_id: (
					await db
						.selectFrom('machines')
						.select('id')
						.where('name', '=', 'HC-20')
						.executeTakeFirstOrThrow()
				).id,
				starts_at: at(0, 6),
				ends_at: at(0, 22),
				order_ref: 'PO-77',
				parts: 1000,
				shots_per_hour: 300,
				created_at: NOW
			})
			.execute();
		// From now (08:00) 100 parts / 2 cavities = 50 shots at 300/h take 10 minutes: inside PO-77.
		const now = await judge({ die: 'Z-1', parts: 100, scrapPct: 0, shotsPerHour: 300 });
		expect(now.verdict).toBe('blocked');
		expect(now.reasons).toMatchObject([{ code: 'die_double_booked' }]);
		const later = await judge({
			die: 'Z-1',
			parts: 100,
			scrapPct: 0,
			shotsPerHour: 300,
			startsAt: at(1, 6)
		});
		expect(later.verdict).toBe('fits');
	});
});
