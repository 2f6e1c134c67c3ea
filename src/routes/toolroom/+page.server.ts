import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listServiceAttention } from '$lib/server/dies/attention';
import { summariseOpenJobs } from '$lib/server/toolroom/board';
import { listWeakCircuits } from '$lib/server/toolroom/cooling';
import { listRisingSurfaces } from '$lib/server/toolroom/inspections';
import { listEntriesToReview } from '$lib/server/shots/review';
import { DIE_EDITORS } from '$lib/roles';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'toolroom_lead', 'toolmaker', 'admin');
	const db = getDb();
	// The toolroom lead (and admin) confirms or corrects flagged ledger entries.
	const reviews = DIE_EDITORS.includes(user.role);
	const [attention, jobs, rising, weakCircuits, toReview] = await Promise.all([
		listServiceAttention(db),
		summariseOpenJobs(db),
		listRisingSurfaces(db),
		listWeakCircuits(db),
		reviews ? listEntriesToReview(db) : Promise.resolve([])
	]);
	return {
		attention: attention.slice(0, 200),
		attentionTotal: attention.length,
		jobs,
		rising: rising.slice(0, 30),
		weakCircuits: weakCircuits.slice(0, 30),
		toReview,
		reviews
	};
};
