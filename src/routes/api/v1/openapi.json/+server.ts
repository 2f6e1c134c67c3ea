import { json } from '@sveltejs/kit';
import { OPENAPI_DOCUMENT } from '$lib/server/api/openapi';
import { apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';

// GET /api/v1/openapi.json — the OpenAPI 3.1 description of /api/v1. Like every API route it asks
// for credentials (any valid token or session, whatever its scopes): a client that can call the
// API can read its description, and the one caller check stays without exceptions.
export const GET = apiRoute(async (event) => {
	await authorizeApi(event, 'any');
	return json(OPENAPI_DOCUMENT, { headers: { 'cache-control': 'no-store' } });
});
