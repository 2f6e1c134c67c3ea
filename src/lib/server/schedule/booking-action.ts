import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import type { UnitSystem } from '../../calc/units';
import { bookingFormSchema } from '../../schemas/schedule';
import { getDb } from '../db';
import { submitBookingForm, type BookingMessage } from './booking-form';

type Schema = Infer<typeof bookingFormSchema>;

/**
 * The booking form's action, for a new booking (`id` undefined) and for editing or moving one:
 * the caller has checked the role. Saved → the booking's page; otherwise the form comes back with
 * the worked-out run, the refusal or the warnings to confirm.
 */
export async function bookingFormAction(
	request: Request,
	user: { id: string; unitSystem: UnitSystem },
	id?: number
) {
	const form = await superValidate<Schema, BookingMessage>(request, zod4(bookingFormSchema));
	if (!form.valid) return fail(400, { form });
	const outcome = await submitBookingForm(
		getDb(),
		form.data,
		{ userId: user.id, tokenId: null, customerId: null },
		user.unitSystem,
		id
	);
	if (outcome.ok) {
		redirect(
			303,
			id === undefined
				? `/bookings/${outcome.id}?booked=1`
				: `/bookings/${outcome.id}?${outcome.changed.length ? 'moved=1' : 'unchanged=1'}`
		);
	}
	if (outcome.field) return setError(form, outcome.field, outcome.message);
	form.data.confirm = false;
	form.data.confirmedWarnings = outcome.confirmedWarnings;
	form.data.shownEndsAt = outcome.shownEndsAt;
	// The worked-out run to read is an ordinary answer (200), not a failure.
	if (outcome.status === 200) return message(form, outcome.message);
	return message(form, outcome.message, { status: outcome.status });
}
