import { json } from '@sveltejs/kit';
import { boardQuerySchema } from '$lib/schemas/schedule';
import { apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { loadBoard } from '$lib/server/schedule/board';
import { audienceOf, boardViewFor } from '$lib/server/owner/customer-fields';

// GET /api/v1/board?from=&days=14|28|56&owner=&family=&press= — the availability board in compact
// tables (see $lib/server/schedule/board.ts). Odd filter values fall back to the defaults.
export const GET = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'dies:read');
	const query = boardQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const board = await loadBoard(getDb(), query, { customerId: principal.customerId });
	return json(boardViewFor(audienceOf(principal), board), {
		headers: { 'cache-control': 'no-store' }
	});
});
