import { redirect } from '@sveltejs/kit';
import { dieListQuerySchema } from '$lib/schemas/die';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listDies, listOwnerOptions } from '$lib/server/dies/register';
import { scopeOf } from '$lib/server/dies/scope';
import { findSingleDie } from '$lib/server/dies/search';
import { DIE_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const query = dieListQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const db = getDb();
	const scope = scopeOf(user);
	// The header's die search (go=1) opens the die when what was typed names exactly one.
	if (event.url.searchParams.get('go') === '1' && query.q) {
		const single = await findSingleDie(db, query.q, scope);
		if (single) redirect(303, `/dies/${encodeURIComponent(single)}`);
	}
	const [list, owners] = await Promise.all([
		listDies(db, query, scope),
		listOwnerOptions(db, scope)
	]);
	return { query, ...list, owners, canCreate: DIE_EDITORS.includes(user.role) };
};
