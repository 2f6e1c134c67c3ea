import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { findDieShotSummary } from '$lib/server/shots/die-summary';
import { SHOT_RECORDERS } from '$lib/roles';
import type { RequestHandler } from './$types';

// The press-run form's live look-up of a die's total and life used (the form also works
// without it, through ?die= on the page itself).
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...SHOT_RECORDERS);
	const number = (event.url.searchParams.get('die') ?? '').trim().toUpperCase();
	if (!number || number.length > 20) {
		return json({ error: 'Give a die number.' }, { status: 400 });
	}
	const summary = await findDieShotSummary(getDb(), number);
	if (!summary) return json({ error: `There is no die ${number}.` }, { status: 404 });
	return json(summary);
};
