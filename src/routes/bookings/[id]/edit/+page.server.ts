import { error } from '@sveltejs/kit';
import { superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { bookingFormSchema } from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { bookingFormAction } from '$lib/server/schedule/booking-action';
import { bookingToForm, type BookingMessage } from '$lib/server/schedule/booking-form';
import { bookingPhase, getBooking } from '$lib/server/schedule/bookings';
import { listPressOptions } from '$lib/server/schedule/presses';
import { nowIso } from '$lib/server/time';
import { BOOKING_EDITORS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

type Schema = Infer<typeof bookingFormSchema>;

function bookingId(param: string) {
	const id = Number(param);
	if (!Number.isInteger(id) || id < 1) error(404, { message: 'There is no such booking.' });
	return id;
}

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...BOOKING_EDITORS);
	const id = bookingId(event.params.id);
	const db = getDb();
	const [booking, presses] = await Promise.all([
		getBooking(db, id, { customerId: null }),
		listPressOptions(db)
	]);
	if (!booking) error(404, { message: 'There is no such booking.' });
	const phase = bookingPhase(booking, nowIso());
	const form = await superValidate<Schema, BookingMessage>(
		bookingToForm(booking),
		zod4(bookingFormSchema),
		{ errors: false }
	);
	return {
		form,
		presses,
		unitSystem: user.unitSystem,
		booking: { id: booking.id, orderRef: booking.order_ref, dieNumber: booking.dieNumber },
		editable: phase === 'planned' || phase === 'running',
		phase
	};
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...BOOKING_EDITORS);
		return bookingFormAction(event.request, user, bookingId(event.params.id));
	}
};
