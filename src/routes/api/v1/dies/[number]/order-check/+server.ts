import { json } from '@sveltejs/kit';
import { orderCheckApiQuerySchema, toUtcIso } from '$lib/schemas/schedule';
import { ApiError, apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { orderCheckApiView, runOrderCheck } from '$lib/server/schedule/order-check';
import { audienceOf, viewFor } from '$lib/server/owner/customer-fields';

// GET /api/v1/dies/{number}/order-check?parts=N[&scrapPct=S&shotsPerHour=R&press=P&from=T] — the
// same verdict as the order-check page and the booking form. Another owner's die answers 404,
// exactly like a missing one.
export const GET = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'dies:read');
	const params = event.url.searchParams;
	const parsed = orderCheckApiQuerySchema.safeParse({
		parts: params.get('parts') ?? undefined,
		scrapPct: params.get('scrapPct') ?? undefined,
		shotsPerHour: params.get('shotsPerHour') ?? undefined,
		press: params.get('press') ?? undefined,
		from: params.get('from') ?? undefined
	});
	if (!parsed.success) {
		throw new ApiError(
			400,
			'The order parameters are not usable.',
			parsed.error.issues.map((i) => ({ field: String(i.path[0] ?? 'query'), message: i.message }))
		);
	}
	const q = parsed.data;
	const result = await runOrderCheck(
		getDb(),
		{
			die: event.params.number ?? '',
			parts: q.parts,
			scrapPct: q.scrapPct,
			shotsPerHour: q.shotsPerHour ?? null,
			press: q.press || null,
			startsAt: q.from ? toUtcIso(q.from) : null
		},
		{ customerId: principal.customerId },
		undefined,
		event.locals.user?.unitSystem ?? 'metric'
	);
	if (!result.ok) {
		if (result.field === 'die') throw new ApiError(404, `There is no die ${event.params.number}.`);
		throw new ApiError(400, result.message, [{ field: 'press', message: result.message }]);
	}
	return json(viewFor(audienceOf(principal), 'orderCheck', orderCheckApiView(result.answer)));
});
