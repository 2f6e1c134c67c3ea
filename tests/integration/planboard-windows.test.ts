// Service windows: reserved toolroom time that the one verdict respects and that becomes a
// toolroom job once, by hand or by the scheduled run.
import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { createBooking } from '../../src/lib/server/schedule/bookings';
import { listBookingsAtRisk } from '../../src/lib/server/schedule/at-risk';
import {
	cancelServiceWindow,
	listServiceWindows,
	reserveServiceWindow,
	startDueServiceWindows,
	startServiceWindow
} from '../../src/lib/server/schedule/service-windows';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import { actor, at, dieId, draft, NOW, openScheduleDb, PLANNER } from './schedule-support';

const LEAD = 'lead-1';
let db: DB;

beforeEach(async () => {
	db = await openScheduleDb();
	await db
		.insertInto('users')
		.values({
			id: LEAD,
			email: 'lead@p.test',
			name: 'Lee Lead',
			role: 'toolroom_lead',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
});
afterEach(async () => {
	await db.destroy();
});

const lead = { userId: LEAD, role: 'toolroom_lead' as const };
const planner = { userId: PLANNER, role: 'scheduler' as const };

/** Z-1, Tuesday 2 March 2027 10:00–18:00 UTC, cooling flush. */
async function reserveTuesday(note = 'Flush both circuits') {
	const r = await reserveServiceWindow(
		db,
		{ die: 'Z-1', startsAt: at(1, 10), endsAt: at(1, 18), kind: 'cooling_flush', note },
		planner,
		NOW
	);
	if (!r.ok) throw new Error(r.message);
	return r.id;
}

describe('a service window blocks the die in the one verdict', () => {
	test('a run overlapping the window is blocked, with the window named', async () => {
		const id = await reserveTuesday();
		// Run Tue 06:00 on HC-20: 4000 parts / 2 cavities = 2000 shots at 250 /h = 8 h of press time;
		// HC-20 (schedule-support) takes 30 min die change + 30 min preheat first, so
		// 06:00 + 0:30 + 0:30 + 8:00 = 15:00, inside the window (10:00–18:00).
		const ev = await judgeRun(
			db,
			{
				die: 'Z-1',
				press: 'HC-20',
				startsAt: at(1, 6),
				parts: 4000,
				scrapPct: 0,
				shotsPerHour: 250
			},
			{ now: NOW }
		);
		if (!ev.ok) throw new Error(ev.message);
		expect(ev.endsAt).toBe(at(1, 15));
		expect(ev.verdict).toBe('blocked');
		expect(ev.blocks).toHaveLength(1);
		expect(ev.blocks[0]).toMatchObject({ code: 'service_window', level: 'block', number: id });
		expect(ev.blocks[0].message).toContain('reserved for the toolroom (cooling-line flush)');
		expect(ev.blocks[0].message).toContain('Flush both circuits');
	});

	test('a run that ends as the window starts, or starts as it ends, is not blocked', async () => {
		await reserveTuesday();
		// The same 9 h run (30 + 30 min change-over on HC-20 + 8 h): 01:00 + 0:30 + 0:30 + 8:00 =
		// 10:00, touching the window's start; 18:00 is its end (18:00–03:00 Wed).
		for (const [start, end] of [
			[at(1, 1), at(1, 10)],
			[at(1, 18), at(2, 3)]
		]) {
			const ev = await judgeRun(
				db,
				{
					die: 'Z-1',
					press: 'HC-20',
					startsAt: start,
					parts: 4000,
					scrapPct: 0,
					shotsPerHour: 250
				},
				{ now: NOW }
			);
			if (!ev.ok) throw new Error(ev.message);
			expect(ev.endsAt).toBe(end);
			expect(ev.verdict).toBe('fits');
		}
	});

	test('another die is not touched by Z-1’s window', async () => {
		await reserveTuesday();
		const ev = await judgeRun(
			db,
			{
				die: 'A-1',
				press: 'CC-40',
				startsAt: at(1, 10),
				parts: 100,
				scrapPct: 0,
				shotsPerHour: 100
			},
			{ now: NOW }
		);
		if (!ev.ok) throw new Error(ev.message);
		expect(ev.blocks.map((b) => b.code)).not.toContain('service_window');
	});

	test('a booking over the window is refused with the reason, and writes nothing', async () => {
		await reserveTuesday();
		const result = await createBooking(
			db,
			draft({ startsAt: at(1, 12), endsAt: at(1, 20), orderRef: 'PO-W1' }),
			actor,
			{ confirm: true, now: NOW }
		);
		expect(result.ok).toBe(false);
		if (result.ok || result.kind !== 'blocked') throw new Error('expected a block');
		expect(result.blocks.map((b) => b.code)).toEqual(['service_window']);
		const count = await db
			.selectFrom('press_bookings')
			.select(db.fn.countAll().as('n'))
			.executeTakeFirst();
		expect(Number(count?.n)).toBe(0);
	});

	test('a cancelled window blocks nothing, and the cancel is audited', async () => {
		const id = await reserveTuesday();
		const c = await cancelServiceWindow(db, id, 'Flush moved to the weekend', lead, NOW);
		expect(c.ok).toBe(true);
		const result = await createBooking(
			db,
			draft({ startsAt: at(1, 12), endsAt: at(1, 20), orderRef: 'PO-W2' }),
			actor,
			{ confirm: true, now: NOW }
		);
		expect(result.ok).toBe(true);
		const audit = await db
			.selectFrom('audit_log')
			.select(['action', 'user_id'])
			.where('action', 'like', 'window.%')
			.orderBy('id')
			.execute();
		expect(audit).toEqual([
			{ action: 'window.reserve', user_id: PLANNER },
			{ action: 'window.cancel', user_id: LEAD }
		]);
		expect(await cancelServiceWindow(db, id, 'again', lead, NOW)).toMatchObject({
			ok: false,
			status: 409
		});
	});

	test('a booking already there is re-judged blocked on the planner’s at-risk list', async () => {
		// Booked first (Tue 12:00–20:00), then a window is forced in underneath by a direct insert
		// (the reserve function itself refuses it, see below).
		const booked = await createBooking(
			db,
			draft({ startsAt: at(1, 12), endsAt: at(1, 20), orderRef: 'PO-W3' }),
			actor,
			{ confirm: true, now: NOW }
		);
		expect(booked.ok).toBe(true);
		await db
			.insertInto('service_windows')
			.values({
				die_id: await dieId(db, 'Z-1'),
				starts_at: at(1, 10),
				ends_at: at(1, 14),
				kind: 'teardown',
				note: null,
				created_by: LEAD,
				created_at: NOW
			})
			.execute();
		const risk = await listBookingsAtRisk(db, 14, NOW);
		expect(risk).toHaveLength(1);
		expect(risk[0].blocks.map((b) => b.code)).toEqual(['service_window']);
	});
});

describe('reserving', () => {
	test('refused over a booked run, over another window, after its end, and for a toolmaker', async () => {
		const booked = await createBooking(
			db,
			draft({ startsAt: at(2, 6), endsAt: at(2, 22), orderRef: 'PO-R1' }),
			actor,
			{ confirm: true, now: NOW }
		);
		expect(booked.ok).toBe(true);
		const over = await reserveServiceWindow(
			db,
			{ die: 'Z-1', startsAt: at(2, 20), endsAt: at(3, 2), kind: 'stress_relief', note: null },
			lead,
			NOW
		);
		expect(over).toMatchObject({ ok: false, status: 409, field: 'startsAt' });
		if (!over.ok) expect(over.message).toContain('order PO-R1');

		await reserveTuesday();
		const twice = await reserveServiceWindow(
			db,
			{ die: 'Z-1', startsAt: at(1, 17), endsAt: at(1, 19), kind: 'teardown', note: null },
			lead,
			NOW
		);
		expect(twice).toMatchObject({ ok: false, status: 409 });

		const past = await reserveServiceWindow(
			db,
			{ die: 'Z-1', startsAt: at(-2, 6), endsAt: at(-2, 8), kind: 'teardown', note: null },
			lead,
			NOW
		);
		expect(past).toMatchObject({ ok: false, field: 'endsAt' });

		const toolmaker = await reserveServiceWindow(
			db,
			{ die: 'A-1', startsAt: at(4, 6), endsAt: at(4, 8), kind: 'teardown', note: null },
			{ userId: LEAD, role: 'toolmaker' },
			NOW
		);
		expect(toolmaker).toMatchObject({ ok: false, status: 403 });
		expect(await listServiceWindows(db, { start: at(0), end: at(10) })).toHaveLength(1);
	});

	test('a retired or unknown die gets a field message', async () => {
		const retired = await reserveServiceWindow(
			db,
			{ die: 'RET-1', startsAt: at(1, 6), endsAt: at(1, 8), kind: 'teardown', note: null },
			lead,
			NOW
		);
		expect(retired).toMatchObject({ ok: false, field: 'die' });
		const unknown = await reserveServiceWindow(
			db,
			{ die: 'NOPE-9', startsAt: at(1, 6), endsAt: at(1, 8), kind: 'teardown', note: null },
			lead,
			NOW
		);
		expect(unknown).toMatchObject({ ok: false, field: 'die', message: 'There is no die NOPE-9.' });
	});
});

describe('a window turns into a toolroom job when it starts', () => {
	test('the scheduled run opens exactly one job across two runs, and tells the toolroom once', async () => {
		const id = await reserveTuesday();
		// Before the start nothing happens.
		expect((await startDueServiceWindows(db, at(1, 9))).started).toEqual([]);
		const first = await startDueServiceWindows(db, at(1, 10));
		const second = await startDueServiceWindows(db, at(1, 10));
		const later = await startDueServiceWindows(db, at(1, 11));
		expect(first.started).toHaveLength(1);
		expect(first.started[0]).toMatchObject({ windowId: id, die: 'Z-1' });
		expect(first.queued).toBe(1); // one toolroom lead with notices on
		expect(second.started).toEqual([]);
		expect(later.started).toEqual([]);

		const jobs = await db
			.selectFrom('toolroom_jobs')
			.select(['number', 'kind', 'half', 'die_to_toolroom', 'opened_by', 'opened_at'])
			.execute();
		expect(jobs).toEqual([
			{
				number: first.started[0].jobNumber,
				kind: 'cooling_flush',
				half: 'both',
				die_to_toolroom: 1,
				opened_by: PLANNER,
				opened_at: at(1, 10)
			}
		]);
		const die = await db
			.selectFrom('dies')
			.select('status')
			.where('number', '=', 'Z-1')
			.executeTakeFirst();
		expect(die?.status).toBe('in_toolroom');
		const notices = await db
			.selectFrom('notices')
			.innerJoin('notice_deliveries as d', 'd.notice_id', 'notices.id')
			.select(['notices.notice_key', 'notices.subject', 'd.recipient'])
			.execute();
		expect(notices).toEqual([
			{
				notice_key: `window:${id}:start`,
				subject: `Z-1 service window started · ${first.started[0].jobNumber} opened`,
				recipient: 'lead@p.test'
			}
		]);
		const [view] = await listServiceWindows(db, { start: at(0), end: at(5) });
		expect(view).toMatchObject({ startedAt: at(1, 10), jobNumber: first.started[0].jobNumber });
	});

	test('“start now” opens the job through the toolroom, and the scheduled run then leaves it alone', async () => {
		const id = await reserveTuesday();
		const started = await startServiceWindow(db, id, lead, at(1, 7));
		expect(started).toMatchObject({ ok: true, windowId: id });
		const again = await startServiceWindow(db, id, lead, at(1, 8));
		expect(again).toMatchObject({ ok: false, status: 409 });
		expect((await startDueServiceWindows(db, at(1, 10))).started).toEqual([]);
		const jobs = await db.selectFrom('toolroom_jobs').select(['number', 'opened_by']).execute();
		expect(jobs).toHaveLength(1);
		expect(jobs[0].opened_by).toBe(LEAD);
		// No mail for a start someone clicked: they are the toolroom.
		const n = await db.selectFrom('notices').select(db.fn.countAll().as('n')).executeTakeFirst();
		expect(Number(n?.n)).toBe(0);
	});

	test('a planner may reserve but not start by hand; a cancelled window never starts', async () => {
		const id = await reserveTuesday();
		expect(await startServiceWindow(db, id, planner, at(1, 7))).toMatchObject({
			ok: false,
			status: 403
		});
		await cancelServiceWindow(db, id, 'Not needed after all', planner, NOW);
		expect((await startDueServiceWindows(db, at(1, 10))).started).toEqual([]);
		const jobs = await db.selectFrom('toolroom_jobs').select('id').execute();
		expect(jobs).toEqual([]);
	});
});

describe('the die’s history words the window entries', () => {
	test('reserve, start and cancel read as sentences', async () => {
		const { describeHistoryEntry } = await import('../../src/lib/history');
		const id = await reserveTuesday('Both halves');
		await startServiceWindow(db, id, lead, at(1, 7));
		await cancelServiceWindow(db, id, 'Done early', lead, at(1, 9));
		const rows = await db
			.selectFrom('audit_log')
			.select(['action', 'detail'])
			.where('action', 'like', 'window.%')
			.orderBy('id')
			.execute();
		const words = rows.map((r) =>
			describeHistoryEntry({ action: r.action, detail: JSON.parse(r.detail) })
		);
		// The test plant runs on UTC: Tuesday 2 March 2027 10:00–18:00.
		expect(words).toEqual([
			'Service window set aside for the toolroom (cooling-line flush) 2027-03-02 10:00 – 2027-03-02 18:00: Both halves',
			expect.stringMatching(/^Toolroom job TJ-\d{5} opened from a service window by hand$/),
			'Service window called off: Done early'
		]);
	});
});
