import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listPressFeed } from '$lib/server/schedule/press-feed';
import { listPresses } from '$lib/server/schedule/presses';
import { BOOKING_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const [presses, feed] = await Promise.all([listPresses(getDb()), listPressFeed(getDb())]);
	return {
		presses,
		feed,
		unitSystem: user.unitSystem,
		canEdit: BOOKING_EDITORS.includes(user.role)
	};
};
