import { superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { bookingFormSchema } from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { bookingFormAction } from '$lib/server/schedule/booking-action';
import { bookingFormDefaults, type BookingMessage } from '$lib/server/schedule/booking-form';
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
			{ errors: false }
		),
		listPressOptions(getDb())
	]);
	return { form, presses, unitSystem: user.unitSystem };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...BOOKING_EDITORS);
		return bookingFormAction(event.request, user);
	}
};
