import { requireRole } from '$lib/server/auth/guard';
import { csvResponse } from '$lib/server/csv';
import { CSV_COLUMNS } from '$lib/server/shots/csv-upload';
import { SHOT_RECORDERS } from '$lib/roles';
import type { RequestHandler } from './$types';

// An empty upload file with the header row the upload reads.
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...SHOT_RECORDERS);
	return csvResponse('castellan-shot-upload.csv', [...CSV_COLUMNS], []);
};
