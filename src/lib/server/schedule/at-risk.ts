import type { UnitSystem } from '../../calc/units';
import type { DB } from '../db/connect';
import { nowIso } from '../time';
import {
	assessRun,
	bookingDraft,
	projectShotsBeforeStart,
	type Assessment,
	type BookingCheck
} from './verdict';
import { listBookingsInWindow, type BookingRow } from './bookings';
import { loadDieFactsByIds } from './die-facts';
import { listOpenToolroomJobs } from './toolroom-hook';
import { findWindowClashes } from './window-clashes';

const DAY_MS = 86_400_000;

export interface BookingAtRisk {
	booking: BookingRow;
	blocks: BookingCheck[];
	warnings: BookingCheck[];
}

function groupBy<T>(rows: T[], key: (row: T) => number) {
	const map = new Map<number, T[]>();
	for (const r of rows) map.set(key(r), [...(map.get(key(r)) ?? []), r]);
	return map;
}

const overlaps = (a: JudgeableBooking, b: JudgeableBooking) =>
	a.id !== b.id && a.starts_at < b.ends_at && b.starts_at < a.ends_at;

/** What judging a stored booking needs from its row. */
export type JudgeableBooking = Pick<
	BookingRow,
	| 'id'
	| 'die_id'
	| 'machine_id'
	| 'dieNumber'
	| 'pressName'
	| 'starts_at'
	| 'ends_at'
	| 'parts'
	| 'scrap_pct'
	| 'shots_per_hour'
	| 'order_ref'
	| 'dieCustomerId'
>;

/**
 * Stored bookings re-checked against today's state of the die and press with the one verdict
 * (`assessRun`), loading everything in a few queries: die facts, presses, open jobs of stopped
 * dies and service windows. Clashes are looked for among the bookings given, so pass every
 * booking of the window. Bookings whose die or press is gone are left out of the map.
 */
export async function judgeBookings(
	db: DB,
	bookings: readonly JudgeableBooking[],
	now = nowIso(),
	units: UnitSystem = 'metric'
): Promise<Map<number, Assessment>> {
	const results = new Map<number, Assessment>();
	if (bookings.length === 0) return results;
	const nowMs = Date.parse(now);
	const dieIds = [...new Set(bookings.map((b) => b.die_id))];
	const first = bookings.reduce(
		(m, b) => (b.starts_at < m ? b.starts_at : m),
		bookings[0].starts_at
	);
	const last = bookings.reduce((m, b) => (b.ends_at > m ? b.ends_at : m), bookings[0].ends_at);
	const [facts, presses, windows] = await Promise.all([
		loadDieFactsByIds(db, dieIds, now),
		db.selectFrom('machines').selectAll().execute(),
		findWindowClashes(db, dieIds, first, last)
	]);
	const stopped = [...facts.values()]
		.filter((d) => d.status === 'in_toolroom' || d.status === 'held')
		.map((d) => d.id);
	const jobs = groupBy(await listOpenToolroomJobs(db, stopped), (j) => j.dieId);
	const byDie = groupBy([...bookings], (b) => b.die_id);
	const byPress = groupBy([...bookings], (b) => b.machine_id);
	const windowsByDie = groupBy(windows, (w) => w.dieId);
	const pressById = new Map(presses.map((p) => [p.id, p]));

	for (const booking of bookings) {
		const die = facts.get(booking.die_id);
		const press = pressById.get(booking.machine_id);
		if (!die || !press) continue;
		const mine = byDie.get(die.id) ?? [];
		results.set(
			booking.id,
			assessRun({
				draft: bookingDraft(booking),
				die,
				press,
				jobs: jobs.get(die.id) ?? [],
				dieClashes: mine.filter((b) => overlaps(b, booking)),
				pressClashes: (byPress.get(press.id) ?? []).filter((b) => overlaps(b, booking)),
				windowClashes: (windowsByDie.get(die.id) ?? []).filter(
					(w) => w.starts_at < booking.ends_at && booking.starts_at < w.ends_at
				),
				shotsBeforeStart: projectShotsBeforeStart(
					die,
					Date.parse(booking.starts_at),
					nowMs,
					mine.filter((b) => b.id !== booking.id)
				),
				now,
				scope: { customerId: null },
				units
			})
		);
	}
	return results;
}

/**
 * Booked orders in the next `days` days re-checked against today's state of the die and press:
 * those now blocked (die gone to the toolroom, press down, a service window reserved …) or at
 * risk (service or end of life inside the run), blocked first, then by start.
 */
export async function listBookingsAtRisk(
	db: DB,
	days = 14,
	now = nowIso(),
	units: UnitSystem = 'metric'
): Promise<BookingAtRisk[]> {
	const end = new Date(Date.parse(now) + days * DAY_MS).toISOString();
	const bookings = await listBookingsInWindow(db, { start: now, end }, { customerId: null });
	const judged = await judgeBookings(db, bookings, now, units);
	const results: BookingAtRisk[] = [];
	for (const booking of bookings) {
		const assessed = judged.get(booking.id);
		if (assessed && (assessed.blocks.length || assessed.warnings.length)) {
			results.push({ booking, blocks: assessed.blocks, warnings: assessed.warnings });
		}
	}
	return results.sort(
		(a, b) =>
			Number(b.blocks.length > 0) - Number(a.blocks.length > 0) ||
			a.booking.starts_at.localeCompare(b.booking.starts_at)
	);
}
