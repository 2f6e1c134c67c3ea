import { json } from '@sveltejs/kit';
import { ApiError, apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { findMountedDie } from '$lib/server/schedule/press-feed';
import type { RequestHandler } from './$types';

// GET /api/v1/presses/{press}/mounted: which die is on the press now — the running die whose
// counts arrive from it, else the booking under way. For the press gateway (shots:write), where a
// press does not report its die. Plant-wide, so a customer-bound caller is refused.
export const GET: RequestHandler = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'shots:write');
	if (principal.customerId !== null) {
		throw new ApiError(403, 'Press information is for the plant, not for a tooling owner.');
	}
	const mounted = await findMountedDie(getDb(), event.params.press);
	if (!mounted) throw new ApiError(404, `There is no press called ${event.params.press}.`);
	return json(mounted);
});
