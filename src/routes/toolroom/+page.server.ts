import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listServiceAttention } from '$lib/server/dies/attention';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'toolroom_lead', 'toolmaker', 'admin');
	const attention = await listServiceAttention(getDb());
	return { attention: attention.slice(0, 200), attentionTotal: attention.length };
};
