import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { dieLife, findDie } from '$lib/server/dies/die-detail';
import { PLANT_ROLES } from '$lib/roles';
import type { LayoutServerLoad } from './$types';

// The die header shared by every tab of the die page.
export const load: LayoutServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const db = getDb();
	const die = await findDie(db, event.params.number, { customerId: null });
	if (!die) error(404, { message: `There is no die ${event.params.number}.` });
	return { die, life: await dieLife(db, die), role: user.role };
};
