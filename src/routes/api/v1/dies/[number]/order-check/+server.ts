import { json } from '@sveltejs/kit';
import { orderCheckQuerySchema } from '$lib/schemas/shots';
import { ApiError, apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { findDie } from '$lib/server/dies/die-detail';
import { checkDieOrder } from '$lib/server/shots/die-order-check';
import { audienceOf, viewFor } from '$lib/server/owner/customer-fields';

// GET /api/v1/dies/{number}/order-check?parts=N&scrapPct=S&shotsPerHour=R. Another owner's die
// answers 404, exactly like a missing one.
export const GET = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'dies:read');
	const params = event.url.searchParams;
	const parsed = orderCheckQuerySchema.safeParse({
		parts: params.get('parts') ?? undefined,
		scrapPct: params.get('scrapPct') ?? undefined,
		shotsPerHour: params.get('shotsPerHour') ?? undefined
	});
	if (!parsed.success) {
		throw new ApiError(
			400,
			'The order parameters are not usable.',
			parsed.error.issues.map((i) => ({ field: String(i.path[0] ?? 'query'), message: i.message }))
		);
	}
	const db = getDb();
	const die = await findDie(db, event.params.number ?? '', { customerId: principal.customerId });
	if (!die) throw new ApiError(404, `There is no die ${event.params.number}.`);
	return json(
		viewFor(audienceOf(principal), 'orderCheck', await checkDieOrder(db, die, parsed.data))
	);
});
