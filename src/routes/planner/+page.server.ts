import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { diesNearEndOfLife, listServiceAttention } from '$lib/server/dies/attention';
import {
	listPlannerDecisions,
	listUnavailableDies,
	summarizeSchedule
} from '$lib/server/schedule/planner';
import { nowIso } from '$lib/server/time';
import type { PageServerLoad } from './$types';

const HORIZON_DAYS = 14;
const SHORT = 5;
/** The full lists behind the home's links (`?show=…`). */
const BOOKING_LISTS = ['blocked', 'unconfirmed', 'serviceFirst', 'risk'] as const;
const OTHER_LISTS = ['serviceDue', 'comingUp', 'nearEnd', 'unavailable'] as const;
type Show = (typeof BOOKING_LISTS)[number] | (typeof OTHER_LISTS)[number];

// The planner's home: what needs a decision today, each a short list, the rest behind links.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'scheduler', 'admin');
	const db = getDb();
	const showParam = event.url.searchParams.get('show') ?? '';
	const show = ([...BOOKING_LISTS, ...OTHER_LISTS] as readonly string[]).includes(showParam)
		? (showParam as Show)
		: null;
	const [decisions, attention, nearEnd, unavailable, summary] = await Promise.all([
		listPlannerDecisions(db, HORIZON_DAYS, nowIso(), user.unitSystem, SHORT),
		listServiceAttention(db),
		diesNearEndOfLife(db, 90),
		listUnavailableDies(db),
		summarizeSchedule(db, HORIZON_DAYS)
	]);
	const serviceDue = attention.filter((a) => a.state === 'due' || a.state === 'overdue');
	const comingUp = attention.filter((a) => a.state === 'coming_up');
	const bookingList = (BOOKING_LISTS as readonly string[]).includes(show ?? '');
	return {
		show,
		full: bookingList ? decisions.all(show as (typeof BOOKING_LISTS)[number]) : null,
		fullService: show === 'serviceDue' ? serviceDue : show === 'comingUp' ? comingUp : null,
		fullNearEnd: show === 'nearEnd' ? nearEnd : null,
		fullUnavailable: show === 'unavailable' ? unavailable : null,
		blocked: decisions.blocked,
		unconfirmed: decisions.unconfirmed,
		serviceFirst: decisions.serviceFirst,
		atRiskTotal: decisions.atRiskTotal,
		counts: {
			serviceDue: serviceDue.length,
			comingUp: comingUp.length,
			nearEnd: nearEnd.length,
			unavailable: unavailable.length
		},
		summary,
		horizonDays: HORIZON_DAYS
	};
};
