import { json } from '@sveltejs/kit';
import { bookingPatchApiSchema } from '$lib/schemas/schedule';
import { ApiError, apiRoute, readJsonBody } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { bookingRefusal, issuesOf, patchedBookingInput } from '$lib/server/schedule/api';
import { bookingApiView, getBooking, updateBooking } from '$lib/server/schedule/bookings';
import { nowIso } from '$lib/server/time';
import { audienceOf, viewFor } from '$lib/server/owner/customer-fields';

// PATCH /api/v1/bookings/{id} — edit or move a booking that has not ended, through the same path
// as the booking form: 422 when a check blocks the change, 409 with the warnings unless
// "confirm": true is sent, 200 with the booking and the fields that changed.
export const PATCH = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'bookings:write');
	const id = Number(event.params.id);
	if (!Number.isInteger(id) || id < 1) throw new ApiError(404, 'There is no such booking.');
	const raw = await readJsonBody(event.request, 20_000);
	if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
		throw new ApiError(400, 'Send the fields to change as a JSON object.');
	}
	const parsed = bookingPatchApiSchema.safeParse(raw);
	if (!parsed.success) throw new ApiError(400, 'The change is not valid.', issuesOf(parsed.error));
	const db = getDb();
	const scope = { customerId: principal.customerId };
	const current = await getBooking(db, id, scope);
	if (!current) throw new ApiError(404, 'There is no such booking.');
	const result = await updateBooking(
		db,
		id,
		patchedBookingInput(current, parsed.data, raw as Record<string, unknown>),
		{ userId: principal.userId, tokenId: principal.tokenId, customerId: principal.customerId },
		{ confirm: parsed.data.confirm, unitSystem: event.locals.user?.unitSystem }
	);
	if (!result.ok) throw bookingRefusal(result);
	const booking = await getBooking(db, id, scope);
	return json({
		booking: viewFor(audienceOf(principal), 'booking', bookingApiView(booking!, nowIso())),
		changed: result.changed,
		verdict: result.plan.verdict,
		warnings: result.warnings.map((w) => w.message)
	});
});
