import { fail } from '@sveltejs/kit';
import { message, superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { cancelBookingSchema } from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadBookingPage } from '$lib/server/schedule/booking-view';
import { cancelBooking } from '$lib/server/schedule/bookings';
import { BOOKING_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

type CancelMessage = { ok: boolean; text: string };
type Schema = Infer<typeof cancelBookingSchema>;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const [view, cancelForm] = await Promise.all([
		loadBookingPage(getDb(), event.params.id, user.unitSystem),
		superValidate<Schema, CancelMessage>(zod4(cancelBookingSchema))
	]);
	return {
		...view,
		cancelForm,
		justBooked: event.url.searchParams.has('booked'),
		justMoved: event.url.searchParams.has('moved'),
		unchanged: event.url.searchParams.has('unchanged'),
		canEdit: BOOKING_EDITORS.includes(user.role)
	};
};

export const actions: Actions = {
	cancel: async (event) => {
		const user = requireRole(event, ...BOOKING_EDITORS);
		const form = await superValidate<Schema, CancelMessage>(
			event.request,
			zod4(cancelBookingSchema)
		);
		if (!form.valid) return fail(400, { cancelForm: form });
		const result = await cancelBooking(
			getDb(),
			Number(event.params.id),
			{ userId: user.id, tokenId: null, customerId: null },
			form.data.reason
		);
		if (!result.ok)
			return message(form, { ok: false, text: result.message }, { status: result.status });
		return message(form, { ok: true, text: 'The booking is cancelled; its slot is free again.' });
	}
};
