import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { listDieBookings } from '$lib/server/schedule/bookings';
import { BOOKING_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const die = await loadPlantDie(event.params.number);
	return {
		bookings: await listDieBookings(getDb(), die.id),
		canBook: BOOKING_EDITORS.includes(user.role)
	};
};
