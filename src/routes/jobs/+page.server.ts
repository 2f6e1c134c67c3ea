import { jobBoardQuerySchema } from '$lib/schemas/toolroom';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { canWorkToolroom, TOOLROOM_READERS } from '$lib/server/toolroom/access';
import { CLOSED_PAGE_SIZE, listClosedJobs, listOpenJobs } from '$lib/server/toolroom/board';
import { listAssignees } from '$lib/server/toolroom/jobs';
import type { PageServerLoad } from './$types';

// The toolroom board: open jobs by status and age, closed jobs by page; filters in the URL.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...TOOLROOM_READERS);
	const query = jobBoardQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const db = getDb();
	const [open, closed, assignees] = await Promise.all([
		listOpenJobs(db, query),
		listClosedJobs(db, query, query.page),
		listAssignees(db)
	]);
	const columns = (['open', 'in_progress', 'waiting_parts'] as const).map((status) => ({
		status,
		jobs: open.filter((j) => j.status === status)
	}));
	return {
		query,
		columns,
		openCount: open.length,
		closed,
		pageSize: CLOSED_PAGE_SIZE,
		assignees,
		canWork: canWorkToolroom(user.role)
	};
};
