import type { DB } from '../db/connect';
import { nowIso } from '../time';
import { evaluateBooking, type BookingCheck } from './booking-checks';
import { listBookingsInWindow, type BookingRow } from './bookings';

const DAY_MS = 86_400_000;

export interface BookingAtRisk {
	booking: BookingRow;
	blocks: BookingCheck[];
	warnings: BookingCheck[];
}

/**
 * Booked orders in the next `days` days re-checked against today's state of the die and press:
 * those now blocked (die gone to the toolroom, press down …) or at risk (service or end of life
 * inside the run), blocked first, then by start.
 */
export async function listBookingsAtRisk(db: DB, days = 14, now = nowIso()): Promise<BookingAtRisk[]> {
	const end = new Date(Date.parse(now) + days * DAY_MS).toISOString();
	const bookings = await listBookingsInWindow(db, { start: now, end }, { customerId: null });
	const results: BookingAtRisk[] = [];
	for (const booking of bookings) {
		const ev = await evaluateBooking(
			db,
			{
				die: booking.dieNumber,
				press: booking.pressName,
				startsAt: booking.starts_at,
				endsAt: booking.ends_at,
				parts: booking.parts,
				scrapPct: booking.scrap_pct,
				shotsPerHour: booking.shots_per_hour
			},
			{ now, excludeBookingId: booking.id }
		);
		if (!ev.ok) continue;
		if (ev.blocks.length || ev.warnings.length) {
			results.push({ booking, blocks: ev.blocks, warnings: ev.warnings });
		}
	}
	return results.sort(
		(a, b) =>
			Number(b.blocks.length > 0) - Number(a.blocks.length > 0) ||
			a.booking.starts_at.localeCompare(b.booking.starts_at)
	);
}
