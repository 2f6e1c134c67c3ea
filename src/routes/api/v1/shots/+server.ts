import { json } from '@sveltejs/kit';
import { apiRoute, readJsonBody } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { ingestShotBody } from '$lib/server/shots/api-ingest';

// 5000 entries of about 150 bytes each fit well inside this.
const MAX_BODY_BYTES = 2_000_000;

// POST /api/v1/shots: one entry or an array of up to 5000, all-or-nothing; a repeated key is
// acknowledged and not counted twice. A customer-bound token sees only its own dies.
export const POST = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'shots:write');
	const body = await readJsonBody(event.request, MAX_BODY_BYTES);
	const answer = await ingestShotBody(getDb(), body, {
		userId: principal.userId,
		tokenId: principal.tokenId,
		customerId: principal.customerId
	});
	return json(answer.body, { status: answer.status });
});
