import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { buildFleetLife } from '$lib/server/dies/fleet';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin', 'toolroom_lead');
	return { families: await buildFleetLife(getDb()) };
};
