import { boardQuerySchema, BOARD_SPANS } from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadBoardFilters, startOfWeek } from '$lib/server/schedule/board';
import { nowIso } from '$lib/server/time';
import { BOOKING_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { PageServerLoad } from './$types';

// The skeleton only: filters and the window. The board's rows come from GET /api/v1/board in the
// browser, so the page paints at once and refreshes without a reload.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const query = boardQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const now = nowIso();
	const filters = await loadBoardFilters(getDb(), { customerId: null });
	return {
		query: { ...query, from: query.from ?? startOfWeek(now) },
		defaultFrom: startOfWeek(now),
		spans: BOARD_SPANS,
		...filters,
		unitSystem: user.unitSystem,
		canBook: BOOKING_EDITORS.includes(user.role)
	};
};
