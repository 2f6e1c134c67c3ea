import { shotListQuerySchema } from '$lib/schemas/shots';
import { requireRole } from '$lib/server/auth/guard';
import { csvResponse } from '$lib/server/csv';
import { getDb } from '$lib/server/db';
import { listShotEntries, SHOT_EXPORT_LIMIT } from '$lib/server/shots/ledger-list';
import { SHOT_RECORDERS } from '$lib/roles';
import { plantTimestamp, plantToday } from '$lib/plant-time';
import type { RequestHandler } from './$types';

// The ledger as filtered on screen, newest first, up to SHOT_EXPORT_LIMIT rows (narrow the dates
// for more). Columns match what the CSV upload reads, plus who counted and when it was entered.
// Times are plant time with their UTC offset, so the file reads back to the same instants.
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...SHOT_RECORDERS);
	const query = shotListQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const { rows } = await listShotEntries(
		getDb(),
		{ ...query, before: '', after: '' },
		SHOT_EXPORT_LIMIT
	);
	return csvResponse(
		`castellan-shots-${plantToday()}.csv`,
		[
			'die',
			'counted_at',
			'shots',
			'counter_start',
			'counter_end',
			'press',
			'source',
			'key',
			'note',
			'entered_by',
			'entered_at',
			// A voided entry is listed (the ledger keeps it) but counts nothing.
			'state',
			'void_reason'
		],
		rows.map((r) => [
			r.die,
			plantTimestamp(r.countedAt),
			r.shots,
			r.counterStart ?? '',
			r.counterEnd ?? '',
			r.press ?? '',
			r.source,
			r.key ?? '',
			r.note ?? '',
			r.enteredBy ?? r.token ?? '',
			plantTimestamp(r.createdAt),
			r.voidedAt ? 'voided' : (r.reviewState ?? 'counted'),
			r.voidReason ?? ''
		])
	);
};
