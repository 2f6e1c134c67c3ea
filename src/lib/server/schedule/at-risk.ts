import type { UnitSystem } from '../../calc/units';
import type { DB } from '../db/connect';
import { nowIso } from '../time';
import { assessRun, projectShotsBeforeStart, type BookingCheck } from './verdict';
import { listBookingsInWindow, type BookingRow } from './bookings';
import { loadDieFactsByIds } from './die-facts';
import { listOpenToolroomJobs } from './toolroom-hook';

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

const overlaps = (a: BookingRow, b: BookingRow) =>
	a.id !== b.id && a.starts_at < b.ends_at && b.starts_at < a.ends_at;

/**
 * Booked orders in the next `days` days re-checked against today's state of the die and press:
 * those now blocked (die gone to the toolroom, press down …) or at risk (service or end of life
 * inside the run), blocked first, then by start. Loads everything in a few queries and runs the
 * same checks as the booking form on each; clashes are looked for among these bookings.
 */
export async function listBookingsAtRisk(
	db: DB,
	days = 14,
	now = nowIso(),
	units: UnitSystem = 'metric'
): Promise<BookingAtRisk[]> {
	const nowMs = Date.parse(now);
	const end = new Date(nowMs + days * DAY_MS).toISOString();
	const bookings = await listBookingsInWindow(db, { start: now, end }, { customerId: null });
	if (bookings.length === 0) return [];
	const [facts, presses] = await Promise.all([
		loadDieFactsByIds(
			db,
			bookings.map((b) => b.die_id),
			now
		),
		db.selectFrom('machines').selectAll().execute()
	]);
	const inToolroom = [...facts.values()]
		.filter((d) => d.status === 'in_toolroom' || d.status === 'held')
		.map((d) => d.id);
	const jobs = groupBy(await listOpenToolroomJobs(db, inToolroom), (j) => j.dieId);
	const byDie = groupBy(bookings, (b) => b.die_id);
	const byPress = groupBy(bookings, (b) => b.machine_id);
	const pressById = new Map(presses.map((p) => [p.id, p]));

	const results: BookingAtRisk[] = [];
	for (const booking of bookings) {
		const die = facts.get(booking.die_id);
		const press = pressById.get(booking.machine_id);
		if (!die || !press) continue;
		const mine = byDie.get(die.id) ?? [];
		const assessed = assessRun({
			draft: {
				die: booking.dieNumber,
				press: booking.pressName,
				startsAt: booking.starts_at,
				endsAt: booking.ends_at,
				parts: booking.parts,
				scrapPct: booking.scrap_pct,
				shotsPerHour: booking.shots_per_hour
			},
			die,
			press,
			jobs: jobs.get(die.id) ?? [],
			dieClashes: mine.filter((b) => overlaps(b, booking)),
			pressClashes: (byPress.get(press.id) ?? []).filter((b) => overlaps(b, booking)),
			shotsBeforeStart: projectShotsBeforeStart(
				die,
				Date.parse(booking.starts_at),
				nowMs,
				mine.filter((b) => b.id !== booking.id)
			),
			now,
			scope: { customerId: null },
			units
		});
		if (assessed.blocks.length || assessed.warnings.length) {
			results.push({ booking, blocks: assessed.blocks, warnings: assessed.warnings });
		}
	}
	return results.sort(
		(a, b) =>
			Number(b.blocks.length > 0) - Number(a.blocks.length > 0) ||
			a.booking.starts_at.localeCompare(b.booking.starts_at)
	);
}
