import { z } from 'zod';
import { requireRole } from '$lib/server/auth/guard';
import { listAudit } from '$lib/server/audit';
import { getDb } from '$lib/server/db';
import type { PageServerLoad } from './$types';

const PAGE_SIZE = 50;
const querySchema = z.object({
	page: z.coerce.number().int().min(1).max(100_000).catch(1),
	action: z
		.string()
		.trim()
		.regex(/^[a-z_.]{0,40}$/)
		.catch('')
});

// Who changed what, when, and from what to what: every audited change, newest first.
export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const query = querySchema.parse(Object.fromEntries(event.url.searchParams));
	const list = await listAudit(getDb(), {
		page: query.page,
		size: PAGE_SIZE,
		action: query.action || undefined
	});
	return { query, ...list, size: PAGE_SIZE };
};
