import { jobBoardQuerySchema } from '$lib/schemas/toolroom';
import { requireRole } from '$lib/server/auth/guard';
import { csvResponse } from '$lib/server/csv';
import { getDb } from '$lib/server/db';
import { TOOLROOM_READERS } from '$lib/server/toolroom/access';
import { listJobsForExport } from '$lib/server/toolroom/board';
import { plantTimestamp, plantToday } from '$lib/plant-time';
import type { RequestHandler } from './$types';

// Every job matching the board's filters, open and closed, for a spreadsheet.
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...TOOLROOM_READERS);
	const query = jobBoardQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const rows = await listJobsForExport(getDb(), query);
	return csvResponse(
		`castellan-toolroom-jobs-${plantToday()}.csv`,
		[
			'job',
			'die',
			'part',
			'owner',
			'kind',
			'half',
			'zone',
			'status',
			'assigned_to',
			'opened_at',
			'closed_at',
			'shots_at_open',
			'shots_at_close',
			'hours',
			'billable_to_owner',
			'parts_used',
			'description',
			'cancel_reason'
		],
		rows.map((r) => [
			r.number,
			r.dieNumber,
			r.partName,
			r.customerName,
			r.kind,
			r.half,
			r.zone ?? '',
			r.status,
			r.assigneeName ?? '',
			plantTimestamp(r.openedAt),
			r.closedAt ? plantTimestamp(r.closedAt) : '',
			r.shotsAtOpen,
			r.shotsAtClose ?? '',
			r.hours ?? '',
			r.billable ? 'yes' : 'no',
			r.partsUsed ?? '',
			r.description,
			r.cancelReason ?? ''
		])
	);
};
