import { error } from '@sveltejs/kit';
import type { UnitSystem } from '../../calc/units';
import type { DB } from '../db/connect';
import { nowIso } from '../time';
import { bookingDraft, judgeRun } from './verdict';
import { bookingPhase, getBooking } from './bookings';
import { listBookingHistory } from './booking-save';
import { shotsNeededFor } from './die-facts';

/**
 * One booking for its page, with the checks run again against today's die and press (a die may
 * have gone to the toolroom since it was booked). Ended and cancelled bookings are not re-checked.
 */
export async function loadBookingPage(
	db: DB,
	idParam: string,
	unitSystem: UnitSystem,
	now = nowIso()
) {
	const id = Number(idParam);
	const booking =
		Number.isInteger(id) && id > 0 ? await getBooking(db, id, { customerId: null }) : undefined;
	if (!booking) error(404, { message: 'There is no such booking.' });
	const phase = bookingPhase(booking, now);
	const shotsPlanned = shotsNeededFor(booking.parts, booking.cavities, booking.scrap_pct);
	let checks = null;
	if (phase === 'planned' || phase === 'running') {
		const ev = await judgeRun(db, bookingDraft(booking), {
			now,
			excludeBookingId: booking.id,
			unitSystem
		});
		if (ev.ok) checks = { blocks: ev.blocks, warnings: ev.warnings };
	}
	const history = await listBookingHistory(db, booking.id);
	return {
		booking,
		phase,
		history,
		shotsPlanned,
		pressHours: shotsPlanned / booking.shots_per_hour,
		checks
	};
}
