import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { bookingFormSchema } from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import {
	bookingFormDefaults,
	submitBookingForm,
	type BookingMessage
} from '$lib/server/schedule/booking-form';
import { listPressOptions } from '$lib/server/schedule/presses';
import { BOOKING_EDITORS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

type Schema = Infer<typeof bookingFormSchema>;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...BOOKING_EDITORS);
	const [form, presses] = await Promise.all([
		superValidate<Schema, BookingMessage>(
			bookingFormDefaults(event.url.searchParams),
			zod4(bookingFormSchema),
			{
				errors: false
			}
		),
		listPressOptions(getDb())
	]);
	return { form, presses, unitSystem: user.unitSystem };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...BOOKING_EDITORS);
		const form = await superValidate<Schema, BookingMessage>(
			event.request,
			zod4(bookingFormSchema)
		);
		if (!form.valid) return fail(400, { form });
		const outcome = await submitBookingForm(
			getDb(),
			form.data,
			{ userId: user.id, tokenId: null, customerId: null },
			user.unitSystem
		);
		if (outcome.ok) redirect(303, `/bookings/${outcome.id}?booked=1`);
		if (outcome.field) return setError(form, outcome.field, outcome.message);
		form.data.confirm = false;
		form.data.confirmedWarnings = outcome.confirmedWarnings;
		return message(form, outcome.message, { status: outcome.status });
	}
};
