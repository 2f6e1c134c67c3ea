import { json } from '@sveltejs/kit';
import { bookingApiSchema, bookingWindowQuerySchema } from '$lib/schemas/schedule';
import { ApiError, apiRoute, readJsonBody } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { bookingRefusal, issuesOf } from '$lib/server/schedule/api';
import {
	bookingApiView,
	createBooking,
	getBooking,
	listBookingsInWindow,
	windowBounds
} from '$lib/server/schedule/bookings';
import { nowIso } from '$lib/server/time';
import { audienceOf, viewFor } from '$lib/server/owner/customer-fields';

// GET /api/v1/bookings?from=YYYY-MM-DD&to=YYYY-MM-DD[&die=&press=&cancelled=1] — bookings that
// overlap the days from..to (plant days, both included). A customer-bound caller sees its own dies only.
export const GET = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'dies:read');
	const parsed = bookingWindowQuerySchema.safeParse(Object.fromEntries(event.url.searchParams));
	if (!parsed.success)
		throw new ApiError(400, 'Give from and to as dates.', issuesOf(parsed.error));
	const q = parsed.data;
	const { start, end } = windowBounds(q.from, q.to);
	const rows = await listBookingsInWindow(
		getDb(),
		{ start, end, die: q.die, press: q.press, includeCancelled: q.cancelled === '1' },
		{ customerId: principal.customerId }
	);
	const now = nowIso();
	return json({
		from: q.from,
		to: q.to,
		bookings: rows.map((b) => viewFor(audienceOf(principal), 'booking', bookingApiView(b, now)))
	});
});

// POST /api/v1/bookings — one booking, through the same path as the form: without endsAt the end is
// worked out (press die change + preheat + press hours); an endsAt other than that needs
// endReason. 422 when a check blocks it, 409 with the warnings unless "confirm": true is sent, 201
// with the booking when made.
export const POST = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'bookings:write');
	const parsed = bookingApiSchema.safeParse(await readJsonBody(event.request, 20_000));
	if (!parsed.success)
		throw new ApiError(400, 'The booking is not complete.', issuesOf(parsed.error));
	const db = getDb();
	const result = await createBooking(
		db,
		parsed.data,
		{ userId: principal.userId, tokenId: principal.tokenId, customerId: principal.customerId },
		{ confirm: parsed.data.confirm, unitSystem: event.locals.user?.unitSystem }
	);
	if (!result.ok) throw bookingRefusal(result);
	const booking = await getBooking(db, result.id, { customerId: principal.customerId });
	return json(
		{
			booking: viewFor(audienceOf(principal), 'booking', bookingApiView(booking!, nowIso())),
			verdict: result.plan.verdict,
			warnings: result.warnings.map((w) => w.message)
		},
		{ status: 201, headers: { location: `/bookings/${result.id}` } }
	);
});
