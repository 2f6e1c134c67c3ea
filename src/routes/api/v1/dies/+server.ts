import { json } from '@sveltejs/kit';
import { dieListQuerySchema } from '$lib/schemas/die';
import { apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { dieApiView } from '$lib/server/dies/api-view';
import { listDies } from '$lib/server/dies/register';
import { audienceOf, viewFor } from '$lib/server/owner/customer-fields';

// GET /api/v1/dies?q=&status=&owner=&family=&sort=&dir=&page=&size= (size up to 200).
export const GET = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'dies:read');
	const query = dieListQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const { rows, total } = await listDies(getDb(), query, { customerId: principal.customerId });
	return json({
		total,
		page: query.page,
		size: query.size,
		dies: rows.map((r) => viewFor(audienceOf(principal), 'die', dieApiView(r)))
	});
});
