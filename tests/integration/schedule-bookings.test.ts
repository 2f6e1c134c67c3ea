import { beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import {
	cancelBooking,
	createBooking,
	warningsAccepted
} from '../../src/lib/server/schedule/bookings';
import { bookingApiSchema, bookingFormSchema, toUtcIso } from '../../src/lib/schemas/schedule';
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

async function checks(over: Parameters<typeof draft>[0] = {}) {
	const ev = await judgeRun(db, draft(over), { now: NOW });
	if (!ev.ok) throw new Error(ev.message);
	return ev;
}
const codes = (list: { code: string }[]) => list.map((c) => c.code);

describe('a clean booking', () => {
	test('Z-1 (zinc, hot chamber, 100 cm²) on HC-20 passes every check and is stored', async () => {
		const ev = await checks();
		expect(ev.blocks).toEqual([]);
		expect(ev.warnings).toEqual([]);
		// 4000 parts from 2 cavities with no scrap = 2000 shots.
		expect(ev.shotsNeeded).toBe(2000);
		const result = await createBooking(db, draft(), actor, { confirm: false, now: NOW });
		expect(result.ok).toBe(true);
		const row = await db.selectFrom('press_bookings').selectAll().executeTakeFirstOrThrow();
		expect(row).toMatchObject({
			order_ref: 'PO-1',
			parts: 4000,
			shots_per_hour: 300,
			created_by: 'planner-1'
		});
		const audit = await db
			.selectFrom('audit_log')
			.select('action')
			.where('action', '=', 'booking.create')
			.execute();
		expect(audit).toHaveLength(1);
	});

	test('an unknown die or press is an input error, not a check', async () => {
		expect(await judgeRun(db, draft({ die: 'NOPE' }), { now: NOW })).toEqual({
			ok: false,
			field: 'die',
			message: 'There is no die NOPE.'
		});
		expect(await judgeRun(db, draft({ press: 'XX-1' }), { now: NOW })).toMatchObject({
			ok: false,
			field: 'press'
		});
	});

	test('another owner’s die is simply not found for a customer-bound caller', async () => {
		const bolt = (
			await db
				.selectFrom('customers')
				.select('id')
				.where('code', '=', 'BOLT')
				.executeTakeFirstOrThrow()
		).id;
		const ev = await judgeRun(db, draft(), { now: NOW, scope: { customerId: bolt } });
		expect(ev).toMatchObject({ ok: false, field: 'die', message: 'There is no die Z-1.' });
	});
});

describe('blocking checks, each with its message', () => {
	test('a retired die', async () => {
		const ev = await checks({ die: 'RET-1', press: 'CC-40' });
		expect(ev.blocks).toContainEqual({
			code: 'die_retired',
			level: 'block',
			message: 'RET-1 is retired and cannot run again.',
			// The number behind it: the shots it retired at (130 000 in the fixture).
			number: 130_000
		});
	});

	test('a held die, with the reason it was held', async () => {
		const ev = await checks({ die: 'HELD-1' });
		expect(ev.blocks).toEqual([
			{
				code: 'die_held',
				level: 'block',
				message:
					'HELD-1 is held: Porosity complaint, awaiting the owner. A held die waits for a decision and cannot run until it is released.',
				number: null
			}
		]);
	});

	test('a die in the toolroom, with its reason and open job', async () => {
		await db
			.insertInto('toolroom_jobs')
			.values({
				number: 'TJ-00007',
				die_id: await dieId(db, 'TR-1'),
				kind: 'repair',
				half: 'ejector',
				description: 'Re-bore the ejector pin hole',
				source: 'die',
				die_shots_at_open: 0,
				opened_at: '2027-02-20T10:00:00.000Z',
				updated_at: '2027-02-20T10:00:00.000Z'
			})
			.execute();
		const ev = await checks({ die: 'TR-1' });
		expect(ev.blocks).toEqual([
			{
				code: 'die_in_toolroom',
				level: 'block',
				message:
					'TR-1 is in the toolroom (Cracked ejector pin bore). It cannot run until its job is closed and the toolroom releases it. Open toolroom job: TJ-00007. No expected release date is recorded.',
				number: null
			}
		]);
	});

	test('a die already booked elsewhere at the same time', async () => {
		expect(
			(await createBooking(db, draft({ press: 'HC-20' }), actor, { confirm: false, now: NOW })).ok
		).toBe(true);
		await db
			.insertInto('machines')
			.values({ name: 'HC-21', chamber: 'hot', clamp_force_kn: 1961 })
			.execute();
		const ev = await checks({
			press: 'HC-21',
			startsAt: at(7, 12),
			endsAt: at(8, 2),
			orderRef: 'PO-2'
		});
		expect(ev.blocks).toEqual([
			{
				code: 'die_double_booked',
				level: 'block',
				message:
					'Z-1 is already booked on HC-20 from 2027-03-08 06:00 to 2027-03-08 22:00 (order PO-1).',
				number: 1
			}
		]);
	});

	test('a press already booked for another die', async () => {
		expect((await createBooking(db, draft(), actor, { confirm: false, now: NOW })).ok).toBe(true);
		await db
			.updateTable('dies')
			.set({ process: 'hot_chamber' })
			.where('number', '=', 'ZC-1')
			.execute();
		const ev = await checks({ die: 'ZC-1', startsAt: at(7, 20), endsAt: at(8, 4) });
		expect(ev.blocks).toContainEqual({
			code: 'press_double_booked',
			level: 'block',
			message:
				'HC-20 is already booked for Z-1 from 2027-03-08 06:00 to 2027-03-08 22:00 (order PO-1).',
			number: 1
		});
	});

	test('a press that is down, with its note', async () => {
		const ev = await checks({ die: 'A-1', press: 'CC-84', shotsPerHour: 100 });
		expect(ev.blocks).toEqual([
			{
				code: 'press_down',
				level: 'block',
				message: 'CC-84 is down for maintenance (Hydraulic pump rebuild).',
				number: null
			}
		]);
	});

	test('a press whose clamping force is below the die’s requirement (Giesserei-Lexikon formula)', async () => {
		// BIG-1: 1400 cm² at the cold-chamber aluminium default 600 bar → 8400 kN × 1.1 = 9240 kN.
		const ev = await checks({ die: 'BIG-1', press: 'CC-40', shotsPerHour: 100 });
		expect(ev.clamp.requiredKn).toBeCloseTo(9240, 6);
		expect(ev.blocks).toEqual([
			{
				code: 'clamp_force',
				level: 'block',
				message:
					'CC-40 clamps 3,923 kN; BIG-1 needs at least 9,240 kN (1,400 cm² × 600 bar ÷ 100 × 1.1 (without slides) = 9,240 kN) (family default pressure; record the die’s own). Choose a larger press. Caution: an under-sized clamp lets the die open and molten metal spray from the parting line. The press maker’s rating and the plant’s procedures decide; this figure is a planning aid.',
				number: 9240
			}
		]);
		const big = await checks({ die: 'BIG-1', press: 'CC-160', shotsPerHour: 100 });
		expect(codes(big.blocks)).toEqual([]);
	});

	test('the clamping force message follows the caller’s unit system', async () => {
		const ev = await judgeRun(db, draft({ die: 'BIG-1', press: 'CC-40', shotsPerHour: 100 }), {
			now: NOW,
			unitSystem: 'us'
		});
		if (!ev.ok) throw new Error(ev.message);
		// 3923 kN / 8.896443 = 441 US tons; 9240 kN = 1,039 US tons.
		expect(ev.blocks[0].message).toContain(
			'CC-40 clamps 441 US tons; BIG-1 needs at least 1,039 US tons'
		);
	});

	test('a hot-chamber die on a cold-chamber press', async () => {
		const ev = await checks({ press: 'CC-40' });
		expect(ev.blocks).toContainEqual({
			code: 'chamber_process',
			level: 'block',
			message: 'Z-1 is built for hot-chamber casting; CC-40 is a cold-chamber press.',
			number: null
		});
	});

	test('aluminium and copper alloys on a hot-chamber press', async () => {
		const al = await checks({ die: 'A-1', press: 'HC-20', shotsPerHour: 100 });
		expect(al.blocks).toContainEqual({
			code: 'chamber_alloy',
			level: 'block',
			message:
				'Aluminium (A380) is cast on cold-chamber presses only: molten aluminium attacks the iron pot and gooseneck of a hot-chamber press. HC-20 is hot chamber.',
			number: null
		});
		const cu = await checks({ die: 'CU-1', press: 'HC-20', parts: 100, shotsPerHour: 100 });
		expect(cu.blocks.find((c) => c.code === 'chamber_alloy')?.message).toMatch(
			/^Copper alloy \(brass\) \(CW617N\) is cast on cold-chamber presses only: copper alloys melt too hot/
		);
	});

	test('magnesium on a cold-chamber press raises nothing; zinc on cold chamber only warns', async () => {
		const mg = await checks({ die: 'MG-1', press: 'CC-40', shotsPerHour: 300 });
		expect(mg.blocks).toEqual([]);
		expect(mg.warnings).toEqual([]);
		const zn = await checks({ die: 'ZC-1', press: 'CC-40' });
		expect(zn.blocks).toEqual([]);
		expect(zn.warnings).toEqual([
			{
				code: 'chamber_alloy',
				level: 'warn',
				message:
					'Zinc (ZA27X) usually runs on hot-chamber presses; CC-40 is cold chamber. Only high-aluminium zinc alloys and very large zinc parts are cast that way.',
				number: null
			}
		]);
	});

	test('blocks cannot be overridden, not even with confirm', async () => {
		const result = await createBooking(db, draft({ die: 'HELD-1' }), actor, {
			confirm: true,
			now: NOW
		});
		expect(result).toMatchObject({ ok: false, kind: 'blocked' });
		expect(await db.selectFrom('press_bookings').select('id').execute()).toHaveLength(0);
	});
});

describe('overlap edges', () => {
	test('a booking ending exactly when the next starts is not an overlap', async () => {
		expect(
			(
				await createBooking(db, draft({ startsAt: at(7, 6), endsAt: at(7, 14) }), actor, {
					confirm: false,
					now: NOW
				})
			).ok
		).toBe(true);
		const next = await createBooking(
			db,
			draft({ startsAt: at(7, 14), endsAt: at(7, 22), orderRef: 'PO-2' }),
			actor,
			{ confirm: false, now: NOW }
		);
		expect(next.ok).toBe(true);
		const before = await checks({ startsAt: at(7, 0), endsAt: at(7, 6) });
		expect(codes(before.blocks)).toEqual([]);
	});

	test('one minute of overlap blocks, on the die and on the press', async () => {
		await createBooking(db, draft({ startsAt: at(7, 6), endsAt: at(7, 14) }), actor, {
			confirm: false,
			now: NOW
		});
		const ev = await checks({
			startsAt: new Date(Date.parse(at(7, 14)) - 60_000).toISOString(),
			endsAt: at(7, 22)
		});
		expect(codes(ev.blocks).sort()).toEqual(['die_double_booked', 'press_double_booked']);
	});

	test('a booking inside another, and one around another, both overlap', async () => {
		await createBooking(db, draft({ startsAt: at(7, 6), endsAt: at(7, 14) }), actor, {
			confirm: false,
			now: NOW
		});
		expect(codes((await checks({ startsAt: at(7, 8), endsAt: at(7, 9) })).blocks)).toContain(
			'die_double_booked'
		);
		expect(codes((await checks({ startsAt: at(7, 0), endsAt: at(7, 23) })).blocks)).toContain(
			'die_double_booked'
		);
	});

	test('a cancelled booking frees its slot; an ended booking cannot be cancelled', async () => {
		const first = await createBooking(db, draft(), actor, { confirm: false, now: NOW });
		if (!first.ok) throw new Error('not booked');
		expect(await cancelBooking(db, first.id, actor, 'Order moved', NOW)).toEqual({ ok: true });
		expect(await cancelBooking(db, first.id, actor, 'Again', NOW)).toMatchObject({
			ok: false,
			status: 409
		});
		expect(
			(await createBooking(db, draft({ orderRef: 'PO-9' }), actor, { confirm: false, now: NOW })).ok
		).toBe(true);
		const later = new Date(Date.parse(at(9, 0))).toISOString();
		const rows = await db
			.selectFrom('press_bookings')
			.select(['id', 'cancelled_at'])
			.where('cancelled_at', 'is', null)
			.execute();
		expect(await cancelBooking(db, rows[0].id, actor, 'Too late', later)).toEqual({
			ok: false,
			status: 409,
			message: 'This booking has ended; it stays on record as it was.'
		});
	});
});

describe('warnings, each with its message', () => {
	test('a service task coming due inside the booking (shot interval)', async () => {
		await addTask(db, 'Z-1', { kind: 'stress_relief', intervalShots: 25_000, leftShots: 1500 });
		const ev = await checks({ startsAt: at(7, 6), endsAt: at(7, 22) });
		// 1500 shots left of a 2000-shot run at 300/h: due 5 h after the first shot, which comes
		// after HC-20's 30 min die change + 30 min preheat: 06:00 + 1 h + 5 h = 12:00.
		expect(ev.warnings).toEqual([
			{
				code: 'service_due',
				level: 'warn',
				message:
					"Stress relief comes due during this run, around 2027-03-08 12:00, after about 1,500 of the run's 2,000 shots.",
				number: 1500
			}
		]);
	});

	test('the shots the die runs before the booking count (trailing rate)', async () => {
		await runDaily(db, 'Z-1', 100);
		await addTask(db, 'Z-1', { kind: 'stress_relief', intervalShots: 25_000, leftShots: 2_000 });
		// The roll-up dates each day at noon; all 28 days fall in (NOW − 28 d, NOW]: 100 shots a day
		// over the 6 d 22 h until the start = 692 shots, leaving 1 308 of the 2 000: due mid-run.
		const ev = await checks();
		expect(ev.shotsBeforeStart).toBe(692);
		expect(ev.warnings[0].message).toMatch(/after about 1,308 of the run's 2,000 shots/);
		// Starting in 30 days, the interval is used up before the run.
		const late = await checks({ startsAt: at(30, 6), endsAt: at(30, 22) });
		expect(late.warnings[0].message).toBe(
			'Stress relief is due before this run starts: its 25,000-shot interval is used up. Plan it first, or run anyway.'
		);
	});

	test('a calendar interval ending during the run', async () => {
		await addTask(db, 'Z-1', { kind: 'cooling_flush', intervalDays: 90, daysAgo: 83 });
		const ev = await checks({ startsAt: at(6, 6), endsAt: at(9, 6) });
		// Hand count: done 83 days before NOW (2027-03-01 08:00 UTC, a UTC plant) = 2026-12-08 08:00;
		// 2026-12-08 + 90 calendar days = 2027-03-08, and a day-based task falls due at the start
		// (plant midnight) of that date: 2027-03-08 00:00.
		expect(ev.warnings.map((w) => w.message)).toEqual([
			'Cooling-line flush comes due during this run, around 2027-03-08 00:00 (90-day interval).'
		]);
	});

	test('an order needing more shots than the remaining life', async () => {
		// CU-1 (brass, 20 000 expected) has 500 shots left; 1 200 parts need 1 200 shots.
		const ev = await checks({ die: 'CU-1', press: 'CC-40', parts: 1200, shotsPerHour: 100 });
		expect(ev.warnings).toEqual([
			{
				code: 'end_of_life',
				level: 'warn',
				message:
					'The order needs 1,200 shots; CU-1 has about 500 left before the end of its expected life (20,000 shots).',
				number: 500
			}
		]);
	});

	test('a planned rate outside the usual range for the alloy (NADCA FAQ ranges)', async () => {
		const ev = await checks({ shotsPerHour: 120, endsAt: at(8, 22) });
		expect(ev.warnings).toEqual([
			{
				code: 'rate_unusual',
				level: 'warn',
				message:
					'120 shots per hour is outside the usual 200–550 for zinc (NADCA). Check the planned rate.',
				number: 120
			}
		]);
	});

	test('a window too short for the shots at the planned rate', async () => {
		const ev = await checks({ startsAt: at(7, 6), endsAt: at(7, 10) });
		expect(ev.warnings).toEqual([
			{
				code: 'too_short',
				level: 'warn',
				// 4 h booked less HC-20's 60 min die change and preheat = 3 h × 300 shots/h = 900 shots.
				message:
					'The booked 4 h less 60 min die change and preheat at 300 shots per hour give about 900 shots; the order needs 2,000. Book more time or plan a faster rate.',
				number: 900
			}
		]);
	});

	test('no rate given means the middle of the usual range', async () => {
		const ev = await checks({ shotsPerHour: null });
		expect(ev.shotsPerHour).toBe(375);
	});
});

describe('confirming warnings', () => {
	const risky = () => draft({ shotsPerHour: 120, endsAt: at(8, 22) });

	test('warnings need an explicit book-anyway, then the booking is made', async () => {
		expect(await createBooking(db, risky(), actor, { confirm: false, now: NOW })).toMatchObject({
			ok: false,
			kind: 'confirm',
			warnings: [{ code: 'rate_unusual' }]
		});
		expect(await db.selectFrom('press_bookings').select('id').execute()).toHaveLength(0);
		const booked = await createBooking(db, risky(), actor, { confirm: ['rate_unusual'], now: NOW });
		expect(booked).toMatchObject({ ok: true, warnings: [{ code: 'rate_unusual' }] });
		const audit = await db
			.selectFrom('audit_log')
			.select('detail')
			.where('action', '=', 'booking.create')
			.executeTakeFirstOrThrow();
		expect(JSON.parse(audit.detail).warningsAccepted).toHaveLength(1);
	});

	test('a confirmation of other warnings than the current ones does not count', () => {
		const w = [
			{ code: 'rate_unusual' as const, level: 'warn' as const, message: '', number: null },
			{ code: 'service_due' as const, level: 'warn' as const, message: '', number: null }
		];
		expect(warningsAccepted(w, ['rate_unusual'])).toBe(false);
		expect(warningsAccepted(w, ['service_due', 'rate_unusual'])).toBe(true);
		expect(warningsAccepted(w, true)).toBe(true);
		expect(warningsAccepted([], false)).toBe(true);
	});
});

describe('booking form input', () => {
	test('datetime-local values are read as plant time (UTC here) and the end must follow the start', () => {
		const ok = bookingFormSchema.safeParse({
			die: 'z-1',
			press: 'HC-20',
			startsAt: '2027-03-08T06:00',
			endsAt: '2027-03-08T22:00',
			orderRef: 'PO',
			parts: '10'
		});
		expect(ok.success && toUtcIso(ok.data.startsAt)).toBe('2027-03-08T06:00:00.000Z');
		expect(toUtcIso('2027-03-08T07:00+01:00')).toBe('2027-03-08T06:00:00.000Z');
		const api = bookingApiSchema.parse({
			die: 'Z-1',
			press: 'HC-20',
			startsAt: '2027-03-08T06:00Z',
			endsAt: '2027-03-08 22:00',
			orderRef: 'PO',
			parts: 10
		});
		expect([api.startsAt, api.endsAt, api.confirm]).toEqual([
			'2027-03-08T06:00:00.000Z',
			'2027-03-08T22:00:00.000Z',
			false
		]);
		expect(ok.success && ok.data.die).toBe('Z-1');
		const bad = bookingFormSchema.safeParse({
			die: 'Z-1',
			press: 'HC-20',
			startsAt: '2027-03-08T06:00',
			endsAt: '2027-03-08T06:00',
			orderRef: 'PO',
			parts: '10'
		});
		expect(bad.success).toBe(false);
		expect(bad.error?.issues[0]).toMatchObject({
			path: ['endsAt'],
			message: 'The end must be after the start.'
		});
		const long = bookingFormSchema.safeParse({
			die: 'Z-1',
			press: 'HC-20',
			startsAt: '2027-03-01T06:00',
			endsAt: '2027-06-08T06:00',
			orderRef: 'PO',
			parts: '10'
		});
		expect(long.error?.issues[0].message).toMatch(/Book at most 90 days/);
		const garbage = bookingFormSchema.safeParse({
			die: 'Z-1',
			press: 'HC-20',
			startsAt: 'tomorrow',
			endsAt: '2027-03-08T06:00',
			orderRef: 'PO',
			parts: '10'
		});
		expect(garbage.error?.issues[0]).toMatchObject({ path: ['startsAt'] });
	});
});
