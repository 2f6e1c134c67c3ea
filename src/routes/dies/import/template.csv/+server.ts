import { requireRole } from '$lib/server/auth/guard';
import { dieTemplateCsv } from '$lib/server/import/templates';
import { DIE_EDITORS } from '$lib/roles';
import type { RequestHandler } from './$types';

// The dies template: the columns the import reads and one example row.
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...DIE_EDITORS);
	return new Response(dieTemplateCsv(), {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': 'attachment; filename="castellan-die-import.csv"'
		}
	});
};
