import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listServiceAttention } from '$lib/server/dies/attention';
import { listDiesInToolroom, listMyOpenJobs, summariseOpenJobs } from '$lib/server/toolroom/board';
import { listWeakCircuits } from '$lib/server/toolroom/cooling';
import { listRisingSurfaces } from '$lib/server/toolroom/inspections';
import { listEntriesToReview } from '$lib/server/shots/review';
import { DIE_EDITORS } from '$lib/roles';
import type { PageServerLoad } from './$types';

/** How many rows each short list on the toolroom home shows before "all …". */
const SHORT = 5;

// The toolmaker's home: their own open jobs first, then the dies standing in the toolroom, then
// what is due — each a short list with a link to the rest.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'toolroom_lead', 'toolmaker', 'admin');
	const db = getDb();
	// The toolroom lead (and admin) confirms or corrects flagged ledger entries.
	const reviews = DIE_EDITORS.includes(user.role);
	const allDue = event.url.searchParams.get('due') === 'all';
	const [mine, inToolroom, attention, jobs, rising, weakCircuits, toReview] = await Promise.all([
		listMyOpenJobs(db, user.id),
		listDiesInToolroom(db),
		listServiceAttention(db),
		summariseOpenJobs(db),
		listRisingSurfaces(db),
		listWeakCircuits(db),
		reviews ? listEntriesToReview(db) : Promise.resolve([])
	]);
	return {
		userId: user.id,
		mine: mine.slice(0, SHORT),
		mineTotal: mine.length,
		inToolroom: inToolroom.slice(0, SHORT),
		inToolroomTotal: inToolroom.length,
		attention: attention.slice(0, allDue ? 200 : SHORT),
		attentionTotal: attention.length,
		allDue,
		jobs,
		rising: rising.slice(0, 30),
		weakCircuits: weakCircuits.slice(0, 30),
		toReview,
		reviews
	};
};
