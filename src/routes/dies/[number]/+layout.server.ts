import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { dieLife, findDie } from '$lib/server/dies/die-detail';
import { countToReview } from '$lib/server/shots/review';
import { PLANT_ROLES } from '$lib/roles';
import type { LayoutServerLoad } from './$types';

// The die header shared by every tab of the die page.
export const load: LayoutServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const db = getDb();
	const die = await findDie(db, event.params.number, { customerId: null });
	if (!die) error(404, { message: `There is no die ${event.params.number}.` });
	const [life, toReview] = await Promise.all([dieLife(db, die), countToReview(db, [die.id])]);
	return { die, life, toReview: toReview.get(die.id) ?? 0, role: user.role };
};
