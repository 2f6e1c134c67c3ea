import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { diesNearEndOfLife, listServiceAttention } from '$lib/server/dies/attention';
import { listBookingsAtRisk } from '$lib/server/schedule/at-risk';
import { listUnavailableDies, summarizeSchedule } from '$lib/server/schedule/planner';
import type { PageServerLoad } from './$types';

const HORIZON_DAYS = 14;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'scheduler', 'admin');
	const db = getDb();
	const [attention, nearEnd, unavailable, atRisk, summary] = await Promise.all([
		listServiceAttention(db),
		diesNearEndOfLife(db, 90),
		listUnavailableDies(db),
		listBookingsAtRisk(db, HORIZON_DAYS, undefined, user.unitSystem),
		summarizeSchedule(db, HORIZON_DAYS)
	]);
	return {
		blockedByService: attention
			.filter((a) => a.state === 'due' || a.state === 'overdue')
			.slice(0, 50),
		comingUp: attention.filter((a) => a.state === 'coming_up').slice(0, 50),
		nearEnd: nearEnd.slice(0, 30),
		unavailable,
		atRisk: atRisk.slice(0, 50).map((r) => ({
			id: r.booking.id,
			dieNumber: r.booking.dieNumber,
			partName: r.booking.partName,
			pressName: r.booking.pressName,
			startsAt: r.booking.starts_at,
			orderRef: r.booking.order_ref,
			blocks: r.blocks,
			warnings: r.warnings
		})),
		atRiskTotal: atRisk.length,
		summary,
		horizonDays: HORIZON_DAYS,
		role: user.role
	};
};
