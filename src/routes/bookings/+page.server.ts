import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listBookingsInWindow } from '$lib/server/schedule/bookings';
import { listPressOptions } from '$lib/server/schedule/presses';
import { nowIso } from '$lib/server/time';
import { BOOKING_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { PageServerLoad } from './$types';

const SPANS = [7, 28, 90] as const;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const days = SPANS.find((d) => String(d) === event.url.searchParams.get('days')) ?? 28;
	const press = (event.url.searchParams.get('press') ?? '').slice(0, 20);
	const now = nowIso();
	const end = new Date(Date.parse(now) + days * 86_400_000).toISOString();
	const db = getDb();
	const [bookings, presses] = await Promise.all([
		listBookingsInWindow(db, { start: now, end, press: press || undefined }, { customerId: null }),
		listPressOptions(db)
	]);
	return {
		bookings,
		presses,
		days,
		press,
		spans: SPANS,
		canEdit: BOOKING_EDITORS.includes(user.role)
	};
};
