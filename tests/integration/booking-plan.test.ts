// Bookings that work out their own end, edits and moves re-checked by the one verdict and kept as
// history, and the form and the API answering the same question the same way.
import { beforeEach, describe, expect, test, vi } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import {
	createBooking,
	listBookingHistory,
	updateBooking
} from '../../src/lib/server/schedule/bookings';
import { submitBookingForm } from '../../src/lib/server/schedule/booking-form';
import { bookingFormSchema } from '../../src/lib/schemas/schedule';
import { actor, addTask, at, dieId, NOW, openScheduleDb, PLANNER } from './schedule-support';

const current: { db: DB | null } = { db: null };
vi.mock('$lib/server/db', () => ({ getDb: () => current.db }));

let db: DB;
beforeEach(async () => {
	db = await openScheduleDb();
	current.db = db;
	// HC-20 gets the plant default change-over for these examples: 90 min die change + 60 min
	// preheat (common practice; the migration's default for existing presses).
	await db
		.updateTable('machines')
		.set({ die_change_minutes: 90, preheat_minutes: 60 })
		.where('name', '=', 'HC-20')
		.execute();
});

/** Z-1: zinc, hot chamber, 2 cavities (schedule-support). No end: it is worked out. */
const order = (over: Record<string, unknown> = {}) => ({
	die: 'Z-1',
	press: 'HC-20',
	startsAt: at(7, 6),
	parts: 4000,
	scrapPct: 2,
	shotsPerHour: 300 as number | null,
	orderRef: 'PO-77',
	...over
});

async function judged(over: Record<string, unknown> = {}) {
	const ev = await judgeRun(db, order(over), { now: NOW });
	if (!ev.ok) throw new Error(ev.message);
	return ev;
}

describe('the end works itself out', () => {
	test('hand-worked: 4 000 parts, 2 cavities, 2 % scrap, 300 shots/h, 90 + 60 min change-over', async () => {
		// Shots  = 4 000 ÷ (2 × 0.98) = 2 040.82 → 2 041 shots (a part shot is a whole shot).
		// Hours  = 2 041 ÷ 300 = 6.8033 h = 6 h 48 min 12 s.
		// Change = 90 min die change + 60 min preheat = 2 h 30 min.
		// Start 2027-03-08 06:00 + 2 h 30 min + 6 h 48 min 12 s = 15:18:12 → next whole minute 15:19.
		const ev = await judged();
		expect(ev.shotsNeeded).toBe(2041);
		expect(ev.pressHours).toBeCloseTo(6.80333, 4);
		expect(ev.dieChangeMinutes).toBe(90);
		expect(ev.preheatMinutes).toBe(60);
		expect(ev.workedOutEndsAt).toBe('2027-03-08T15:19:00.000Z');
		expect(ev.endsAt).toBe(ev.workedOutEndsAt);

		const made = await createBooking(db, order(), actor, { confirm: false, now: NOW });
		expect(made.ok).toBe(true);
		const row = await db.selectFrom('press_bookings').selectAll().executeTakeFirstOrThrow();
		expect(row.ends_at).toBe('2027-03-08T15:19:00.000Z');
		expect(row.end_reason).toBeNull();
	});

	test('the rate: given, else the die’s, else the press’s, else the alloy’s usual range', async () => {
		await db
			.updateTable('machines')
			.set({ shots_per_hour: 250 })
			.where('name', '=', 'HC-20')
			.execute();
		// Press rate: 2 041 ÷ 250 = 8.164 h = 8 h 9 min 50.4 s; + 2 h 30 min from 06:00 = 16:39:50.4
		// → 16:40.
		const byPress = await judged({ shotsPerHour: null });
		expect([byPress.shotsPerHour, byPress.rateSource]).toEqual([250, 'press']);
		expect(byPress.workedOutEndsAt).toBe('2027-03-08T16:40:00.000Z');
		await db.updateTable('dies').set({ shots_per_hour: 320 }).where('number', '=', 'Z-1').execute();
		const byDie = await judged({ shotsPerHour: null });
		expect([byDie.shotsPerHour, byDie.rateSource]).toEqual([320, 'die']);
		const given = await judged({ shotsPerHour: 300 });
		expect([given.shotsPerHour, given.rateSource]).toEqual([300, 'order']);
		await db
			.updateTable('dies')
			.set({ shots_per_hour: null })
			.where('number', '=', 'Z-1')
			.execute();
		await db
			.updateTable('machines')
			.set({ shots_per_hour: null })
			.where('name', '=', 'HC-20')
			.execute();
		// Zinc's usual range is 300–450 shots/h (NADCA FAQ, as calc/life): the middle is 375.
		const byAlloy = await judged({ shotsPerHour: null });
		expect([byAlloy.shotsPerHour, byAlloy.rateSource]).toEqual([375, 'alloy']);
	});

	test('an end set by hand needs a reason, which is kept', async () => {
		const refused = await createBooking(db, order({ endsAt: at(7, 22) }), actor, {
			confirm: false,
			now: NOW
		});
		expect(refused).toMatchObject({ ok: false, kind: 'invalid', field: 'endReason' });
		if (refused.ok || refused.kind !== 'invalid') throw new Error('expected a refusal');
		expect(refused.message).toContain('2027-03-08 15:19');
		expect(await db.selectFrom('press_bookings').select('id').execute()).toEqual([]);

		const made = await createBooking(
			db,
			order({ endsAt: at(7, 22), endReason: 'Runs to the end of the late shift' }),
			actor,
			{ confirm: false, now: NOW }
		);
		expect(made.ok).toBe(true);
		const row = await db.selectFrom('press_bookings').selectAll().executeTakeFirstOrThrow();
		expect([row.ends_at, row.end_reason]).toEqual([at(7, 22), 'Runs to the end of the late shift']);
	});

	test('the form shows the worked-out run back before it saves anything', async () => {
		const data = bookingFormSchema.parse({
			die: 'Z-1',
			press: 'HC-20',
			startsAt: '2027-03-08T06:00',
			orderRef: 'PO-77',
			parts: '4000',
			scrapPct: '2',
			shotsPerHour: '300'
		});
		const first = await submitBookingForm(db, data, actor, 'metric');
		expect(first).toMatchObject({
			ok: false,
			field: null,
			status: 200,
			shownEndsAt: '2027-03-08T15:19'
		});
		expect(await db.selectFrom('press_bookings').select('id').execute()).toEqual([]);
		if (first.ok || first.field !== null) throw new Error('expected the review');
		expect(first.message.plan).toMatchObject({ shotsNeeded: 2041, cavities: 2, verdict: 'fits' });

		const second = await submitBookingForm(
			db,
			{ ...data, shownEndsAt: first.shownEndsAt },
			actor,
			'metric'
		);
		expect(second.ok).toBe(true);
		// Changing the parts after the look changes the end: shown again, not saved.
		const third = await submitBookingForm(
			db,
			{ ...data, parts: 2000, startsAt: '2027-03-10T06:00', shownEndsAt: first.shownEndsAt },
			actor,
			'metric'
		);
		expect(third).toMatchObject({ ok: false, status: 200 });
		expect(await db.selectFrom('press_bookings').select('id').execute()).toHaveLength(1);
	});
});

describe('edits and moves', () => {
	async function book(over: Record<string, unknown> = {}) {
		const made = await createBooking(db, order(over), actor, { confirm: false, now: NOW });
		if (!made.ok) throw new Error(JSON.stringify(made));
		return made.id;
	}

	test('a move into the days a service falls due re-runs the verdict and asks first', async () => {
		// Cooling flush every 90 days, done 83 days before NOW: due 2027-03-08 00:00 (plant midnight,
		// worked out by hand in schedule-bookings.test.ts).
		await addTask(db, 'Z-1', { kind: 'cooling_flush', intervalDays: 90, daysAgo: 83 });
		const id = await book({ startsAt: at(3, 6) }); // 2027-03-04 06:00 → 15:19, before the due day
		const moved = order({ startsAt: at(6, 20) }); // 2027-03-07 20:00 → 2027-03-08 05:19
		const asked = await updateBooking(db, id, moved, actor, { confirm: false, now: NOW });
		expect(asked).toMatchObject({
			ok: false,
			kind: 'confirm',
			warnings: [{ code: 'service_due' }]
		});
		const unchanged = await db.selectFrom('press_bookings').selectAll().executeTakeFirstOrThrow();
		expect(unchanged.starts_at).toBe(at(3, 6));

		const saved = await updateBooking(db, id, moved, actor, { confirm: ['service_due'], now: NOW });
		expect(saved).toMatchObject({ ok: true, changed: ['start', 'end'] });
		const row = await db.selectFrom('press_bookings').selectAll().executeTakeFirstOrThrow();
		// 20:00 + 2 h 30 min + 6 h 48 min 12 s = 05:18:12 next day → 05:19.
		expect([row.starts_at, row.ends_at]).toEqual([at(6, 20), '2027-03-08T05:19:00.000Z']);
		expect(row.updated_by).toBe(PLANNER);

		const history = await listBookingHistory(db, id);
		expect(history.map((h) => [h.kind, h.verdictBefore, h.verdictAfter])).toEqual([
			['create', null, 'fits'],
			['edit', 'fits', 'warning']
		]);
		expect(history[1]).toMatchObject({
			who: 'Pat Planner',
			at: NOW,
			changes: {
				start: [at(3, 6), at(6, 20)],
				end: ['2027-03-04T15:19:00.000Z', '2027-03-08T05:19:00.000Z']
			}
		});
		expect(history[1].reasonsAfter[0]).toMatch(/^Cooling-line flush comes due during this run/);
	});

	test('a move into a blocked slot is refused with its reasons and changes nothing', async () => {
		await book({ startsAt: at(3, 6), orderRef: 'PO-1' });
		const second = await book({ startsAt: at(5, 6), orderRef: 'PO-2' });
		const refused = await updateBooking(
			db,
			second,
			order({ startsAt: at(3, 10), orderRef: 'PO-2' }),
			actor,
			{
				confirm: true,
				now: NOW
			}
		);
		expect(refused).toMatchObject({ ok: false, kind: 'blocked' });
		if (refused.ok || refused.kind !== 'blocked') throw new Error('expected a block');
		expect(refused.blocks.map((b) => b.code).sort()).toEqual([
			'die_double_booked',
			'press_double_booked'
		]);
		const row = await db
			.selectFrom('press_bookings')
			.selectAll()
			.where('id', '=', second)
			.executeTakeFirstOrThrow();
		expect(row.starts_at).toBe(at(5, 6));
		expect(await listBookingHistory(db, second)).toHaveLength(1);
	});

	test('parts changed: the end follows; nothing changed writes no history', async () => {
		const id = await book();
		// 2 000 parts: 2 000 ÷ 1.96 = 1 020.41 → 1 021 shots ÷ 300 = 3.4033 h = 3 h 24 min 12 s;
		// 06:00 + 2 h 30 min + 3 h 24 min 12 s = 11:54:12 → 11:55.
		const saved = await updateBooking(db, id, order({ parts: 2000 }), actor, {
			confirm: false,
			now: NOW
		});
		expect(saved).toMatchObject({ ok: true, changed: ['end', 'parts'] });
		const row = await db.selectFrom('press_bookings').selectAll().executeTakeFirstOrThrow();
		expect(row.ends_at).toBe('2027-03-08T11:55:00.000Z');
		const again = await updateBooking(db, id, order({ parts: 2000 }), actor, {
			confirm: false,
			now: NOW
		});
		expect(again).toMatchObject({ ok: true, changed: [] });
		expect(await listBookingHistory(db, id)).toHaveLength(2);
	});

	test('a cancelled or unknown booking cannot be moved', async () => {
		const id = await book();
		await db
			.updateTable('press_bookings')
			.set({ cancelled_at: NOW })
			.where('id', '=', id)
			.execute();
		expect(await updateBooking(db, id, order(), actor, { confirm: true, now: NOW })).toMatchObject({
			ok: false,
			kind: 'gone',
			status: 409
		});
		expect(await updateBooking(db, 999, order(), actor, { confirm: true, now: NOW })).toMatchObject(
			{
				ok: false,
				kind: 'gone',
				status: 404
			}
		);
	});
});

describe('the form and the API give the same answer', () => {
	const ORIGIN = 'http://plant.test';
	const user = {
		id: PLANNER,
		role: 'scheduler',
		name: 'Pat Planner',
		email: 'p@p.test',
		customerId: null,
		unitSystem: 'metric'
	};
	// eslint-disable-next-line @typescript-eslint/no-explicit-any
	const apiEvent = (path: string, method: string, body: unknown, params = {}): any => {
		const url = new URL(`${ORIGIN}${path}`);
		return {
			url,
			params,
			locals: { user, session: null },
			request: new Request(url, {
				method,
				body: JSON.stringify(body),
				headers: { 'content-type': 'application/json' }
			}),
			route: { id: null }
		};
	};
	const formData = (over: Record<string, string> = {}) =>
		bookingFormSchema.parse({
			die: 'Z-1',
			press: 'HC-20',
			startsAt: '2027-03-08T06:00',
			orderRef: 'PO-88',
			parts: '4000',
			scrapPct: '2',
			shotsPerHour: '300',
			...over
		});

	test('a new booking: same end, same verdict; a clash: the same blocks', async () => {
		const form = await submitBookingForm(db, formData(), actor, 'metric');
		if (form.ok || form.field !== null) throw new Error('expected the review');
		const { POST } = await import('../../src/routes/api/v1/bookings/+server');
		const res = await POST(
			apiEvent('/api/v1/bookings', 'POST', {
				die: 'Z-1',
				press: 'HC-20',
				startsAt: '2027-03-08T06:00:00Z',
				orderRef: 'PO-88',
				parts: 4000,
				scrapPct: 2,
				shotsPerHour: 300
			})
		);
		expect(res.status).toBe(201);
		const body = await res.json();
		expect(body.booking.endsAt).toBe(form.message.plan!.endsAt);
		expect(body.verdict).toBe(form.message.plan!.verdict);

		// Now the slot is taken: the form and the API both refuse, for the same reasons.
		const formAgain = await submitBookingForm(
			db,
			{ ...formData(), shownEndsAt: form.shownEndsAt },
			actor,
			'metric'
		);
		if (formAgain.ok || formAgain.field !== null) throw new Error('expected a refusal');
		const apiAgain = await POST(
			apiEvent('/api/v1/bookings', 'POST', {
				die: 'Z-1',
				press: 'HC-20',
				startsAt: '2027-03-08T06:00:00Z',
				orderRef: 'PO-89',
				parts: 4000,
				scrapPct: 2,
				shotsPerHour: 300,
				confirm: true
			})
		);
		expect(apiAgain.status).toBe(422);
		const refusal = await apiAgain.json();
		expect(refusal.issues.map((i: { field: string }) => i.field).sort()).toEqual(
			formAgain.message.blocks.map((b) => b.code).sort()
		);
		expect(formAgain.message.kind).toBe('blocked');
	});

	test('a move: PATCH and the edit form give the same end and verdict, and both keep history', async () => {
		await addTask(db, 'Z-1', { kind: 'cooling_flush', intervalDays: 90, daysAgo: 83 });
		const a = await createBooking(db, order({ startsAt: at(2, 6), orderRef: 'PO-A' }), actor, {
			confirm: false,
			now: NOW
		});
		if (!a.ok) throw new Error('not booked');
		// The edit form's look at the move (saves nothing).
		const look = await submitBookingForm(
			db,
			formData({ startsAt: '2027-03-07T20:00', orderRef: 'PO-A' }),
			actor,
			'metric',
			a.id
		);
		if (look.ok || look.field !== null) throw new Error('expected the review');
		expect(look.message.kind).toBe('review');

		const { PATCH } = await import('../../src/routes/api/v1/bookings/[id]/+server');
		const asked = await PATCH(
			apiEvent(
				`/api/v1/bookings/${a.id}`,
				'PATCH',
				{ startsAt: '2027-03-07T20:00:00Z' },
				{ id: String(a.id) }
			)
		);
		// The move meets a service coming due: the API asks for confirm, like the form.
		expect(asked.status).toBe(409);
		const warned = await asked.json();
		expect(warned.issues.map((i: { field: string }) => i.field)).toEqual(
			look.message.warnings.map((w) => w.code)
		);
		const res = await PATCH(
			apiEvent(
				`/api/v1/bookings/${a.id}`,
				'PATCH',
				{ startsAt: '2027-03-07T20:00:00Z', confirm: true },
				{ id: String(a.id) }
			)
		);
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.booking.endsAt).toBe(look.message.plan!.endsAt);
		expect(body.verdict).toBe(look.message.plan!.verdict);
		expect(body.changed).toEqual(['start', 'end']);
		const history = await listBookingHistory(db, a.id);
		expect(history.map((h) => h.kind)).toEqual(['create', 'edit']);
		expect(history[1].verdictAfter).toBe('warning');
	});
});

describe('the planner home', () => {
	test('blocked, unconfirmed warnings and service-first come from the verdict, five at most', async () => {
		const { listPlannerDecisions } = await import('../../src/lib/server/schedule/planner');
		// Booked clean on day 3; a cooling flush then falls due 2027-03-08 00:00, inside a run
		// booked on day 6 from 20:00, whose warning the planner accepted when booking.
		const clean = await createBooking(db, order({ startsAt: at(3, 6), orderRef: 'PO-C' }), actor, {
			confirm: false,
			now: NOW
		});
		await addTask(db, 'Z-1', { kind: 'cooling_flush', intervalDays: 90, daysAgo: 83 });
		const accepted = await createBooking(
			db,
			order({ startsAt: at(6, 20), orderRef: 'PO-W' }),
			actor,
			{ confirm: ['service_due'], now: NOW }
		);
		if (!clean.ok || !accepted.ok) throw new Error('not booked');
		// The clean booking is still clean (it ends before the due day): nothing unconfirmed yet.
		let d = await listPlannerDecisions(db, 14, NOW);
		expect(d.unconfirmed.rows.map((r) => r.orderRef)).toEqual([]);
		expect(d.serviceFirst.rows).toEqual([]); // the die's first booking (PO-C) carries no service warning
		// Now the task is 3 days further on: due 2027-03-05 00:00, inside nothing booked yet but
		// before PO-W — which was accepted for a service coming due *during* it, and now has it due
		// *before* it starts: still the same kind of warning (service_due), so still accepted.
		await db
			.updateTable('service_tasks')
			.set({ last_done_at: '2026-12-05T08:00:00.000Z' })
			.execute();
		d = await listPlannerDecisions(db, 14, NOW);
		expect(d.unconfirmed.total).toBe(0);
		// A held die makes every one of its bookings blocked.
		await db.updateTable('dies').set({ status: 'held' }).where('number', '=', 'Z-1').execute();
		d = await listPlannerDecisions(db, 14, NOW);
		expect(d.blocked.rows.map((r) => [r.orderRef, r.verdict])).toEqual([
			['PO-C', 'blocked'],
			['PO-W', 'blocked']
		]);
		await db.updateTable('dies').set({ status: 'ready' }).where('number', '=', 'Z-1').execute();
		// A warning of another kind on PO-C (a rate outside zinc's 300–450 shots/h) was never
		// accepted: listed as unconfirmed.
		await db
			.updateTable('press_bookings')
			.set({ shots_per_hour: 120 })
			.where('order_ref', '=', 'PO-C')
			.execute();
		d = await listPlannerDecisions(db, 14, NOW);
		expect(d.unconfirmed.rows.map((r) => r.orderRef)).toEqual(['PO-C']);
		// Seven more bookings at that rate, written directly (as before bookings kept a history, so
		// nothing was accepted): eight unconfirmed in all, five shown, the rest behind "All 8".
		const z1 = await dieId(db, 'Z-1');
		const hc20 = (
			await db
				.selectFrom('machines')
				.select('id')
				.where('name', '=', 'HC-20')
				.executeTakeFirstOrThrow()
		).id;
		for (let day = 9; day < 16; day++) {
			await db
				.insertInto('press_bookings')
				.values({
					die_id: z1,
					machine_id: hc20,
					starts_at: at(day - 1, 1),
					ends_at: at(day - 1, 23),
					order_ref: `PO-X${day}`,
					parts: 100,
					scrap_pct: 2,
					shots_per_hour: 120,
					created_by: PLANNER,
					created_at: NOW,
					cancelled_at: null,
					cancelled_by: null,
					cancel_reason: null,
					notes: null,
					end_reason: 'Legacy row'
				})
				.execute();
		}
		d = await listPlannerDecisions(db, 14, NOW);
		expect(d.unconfirmed.total).toBe(8);
		expect(d.unconfirmed.rows).toHaveLength(5);
		expect(d.all('unconfirmed').rows).toHaveLength(8);
	});
});
