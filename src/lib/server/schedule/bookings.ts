import { plantDayStart } from '../../plant-time';
import { MAX_BOOKING_DAYS } from '../../schemas/schedule';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { DieScope } from '../dies/register';
import { nowIso } from '../time';
import { shotsNeededFor } from './die-facts';
import type { BookingActor } from './booking-save';

const DAY_MS = 86_400_000;

export {
	createBooking,
	updateBooking,
	listBookingHistory,
	warningsAccepted,
	type BookingActor,
	type NewBookingInput,
	type CreateBookingResult,
	type SaveBookingResult,
	type BookingPlan
} from './booking-save';
/** Cancels a booking that has not ended yet; an ended booking stays on record as it was. */
export async function cancelBooking(
	db: DB,
	id: number,
	actor: BookingActor,
	reason: string,
	now = nowIso()
): Promise<{ ok: true } | { ok: false; status: 404 | 409; message: string }> {
	return writeTransaction(db, async (trx) => {
		const booking = await trx
			.selectFrom('press_bookings')
			.innerJoin('dies', 'dies.id', 'press_bookings.die_id')
			.select([
				'press_bookings.id',
				'press_bookings.die_id',
				'press_bookings.ends_at',
				'press_bookings.cancelled_at',
				'press_bookings.order_ref',
				'dies.customer_id'
			])
			.where('press_bookings.id', '=', id)
			.executeTakeFirst();
		if (!booking || (actor.customerId !== null && booking.customer_id !== actor.customerId)) {
			return { ok: false, status: 404, message: 'There is no such booking.' };
		}
		if (booking.cancelled_at)
			return { ok: false, status: 409, message: 'This booking is already cancelled.' };
		if (booking.ends_at <= now) {
			return {
				ok: false,
				status: 409,
				message: 'This booking has ended; it stays on record as it was.'
			};
		}
		await trx
			.updateTable('press_bookings')
			.set({ cancelled_at: now, cancelled_by: actor.userId, cancel_reason: reason })
			.where('id', '=', id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				tokenId: actor.tokenId,
				action: 'booking.cancel',
				dieId: booking.die_id,
				detail: { booking: id, order: booking.order_ref, reason }
			},
			now
		);
		return { ok: true };
	});
}

export type BookingPhase = 'cancelled' | 'planned' | 'running' | 'ended';

/** Where a booking stands at `now` (by its window; shots come from the ledger, not from here). */
export function bookingPhase(
	b: { starts_at: string; ends_at: string; cancelled_at: string | null },
	now: string
): BookingPhase {
	if (b.cancelled_at) return 'cancelled';
	if (b.ends_at <= now) return 'ended';
	if (b.starts_at <= now) return 'running';
	return 'planned';
}

function bookingsQuery(db: DB, scope: DieScope) {
	return db
		.selectFrom('press_bookings as b')
		.innerJoin('dies', 'dies.id', 'b.die_id')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.innerJoin('machines', 'machines.id', 'b.machine_id')
		.leftJoin('users as creator', 'creator.id', 'b.created_by')
		.select([
			'b.id',
			'b.die_id',
			'b.machine_id',
			'b.starts_at',
			'b.ends_at',
			'b.order_ref',
			'b.parts',
			'b.scrap_pct',
			'b.shots_per_hour',
			'b.created_at',
			'b.cancelled_at',
			'b.cancel_reason',
			'b.notes',
			'b.end_reason',
			'b.updated_at',
			'dies.number as dieNumber',
			'dies.part_name as partName',
			'dies.cavities',
			'dies.customer_id as dieCustomerId',
			'customers.code as customerCode',
			'customers.name as customerName',
			'machines.name as pressName',
			'creator.name as createdByName'
		])
		.$if(scope.customerId !== null, (q) => q.where('dies.customer_id', '=', scope.customerId!));
}
export type BookingRow = Awaited<ReturnType<ReturnType<typeof bookingsQuery>['execute']>>[number];

/** One booking within the caller's scope. */
export async function getBooking(db: DB, id: number, scope: DieScope) {
	return bookingsQuery(db, scope).where('b.id', '=', id).executeTakeFirst();
}

/** Start of the plant day `from` (`YYYY-MM-DD`), and the start of the day after `to`, as ISO instants. */
export function windowBounds(from: string, to: string) {
	const start = plantDayStart(from);
	const end = plantDayStart(new Date(Date.parse(to) + DAY_MS).toISOString().slice(0, 10));
	return { start, end };
}

/**
 * Bookings overlapping [start, end). Bookings are at most MAX_BOOKING_DAYS long, so only starts
 * from start − that length can reach into the window; that bound lets the starts_at index do the
 * work even with years of bookings.
 */
export async function listBookingsInWindow(
	db: DB,
	window: { start: string; end: string; die?: string; press?: string; includeCancelled?: boolean },
	scope: DieScope
) {
	const earliest = new Date(Date.parse(window.start) - MAX_BOOKING_DAYS * DAY_MS).toISOString();
	return bookingsQuery(db, scope)
		.where('b.starts_at', '>=', earliest)
		.where('b.starts_at', '<', window.end)
		.where('b.ends_at', '>', window.start)
		.$if(!window.includeCancelled, (q) => q.where('b.cancelled_at', 'is', null))
		.$if(!!window.die, (q) => q.where('dies.number', '=', window.die!.toUpperCase()))
		.$if(!!window.press, (q) => q.where('machines.name', '=', window.press!.toUpperCase()))
		.orderBy('b.starts_at')
		.orderBy('b.id')
		.execute();
}

/** A die's bookings, upcoming (soonest first) and past (latest first), cancelled ones included. */
export async function listDieBookings(db: DB, dieId: number, now = nowIso(), pastLimit = 50) {
	const [upcoming, past] = await Promise.all([
		bookingsQuery(db, { customerId: null })
			.where('b.die_id', '=', dieId)
			.where('b.ends_at', '>', now)
			.orderBy('b.starts_at')
			.execute(),
		bookingsQuery(db, { customerId: null })
			.where('b.die_id', '=', dieId)
			.where('b.ends_at', '<=', now)
			.orderBy('b.starts_at', 'desc')
			.limit(pastLimit)
			.execute()
	]);
	return { upcoming, past };
}

/** A press's bookings that have not ended, soonest first. */
export async function listPressUpcoming(db: DB, machineId: number, now = nowIso(), limit = 100) {
	return bookingsQuery(db, { customerId: null })
		.where('b.machine_id', '=', machineId)
		.where('b.ends_at', '>', now)
		.where('b.cancelled_at', 'is', null)
		.orderBy('b.starts_at')
		.limit(limit)
		.execute();
}

/** The booking as the JSON API answers it. */
export function bookingApiView(b: BookingRow, now: string) {
	return {
		id: b.id,
		die: b.dieNumber,
		part: b.partName,
		customer: b.customerCode,
		press: b.pressName,
		startsAt: b.starts_at,
		endsAt: b.ends_at,
		orderRef: b.order_ref,
		parts: b.parts,
		scrapPct: b.scrap_pct,
		shotsPerHour: b.shots_per_hour,
		shotsPlanned: shotsNeededFor(b.parts, b.cavities, b.scrap_pct),
		status: bookingPhase(b, now),
		cancelledAt: b.cancelled_at,
		notes: b.notes,
		/** Why the end differs from the worked-out one; null when it was worked out. */
		endReason: b.end_reason
	};
}
