import { requireRole } from '$lib/server/auth/guard';
import { dieTemplateXlsx } from '$lib/server/import/templates';
import { DIE_EDITORS } from '$lib/roles';
import type { RequestHandler } from './$types';

// The workbook template: Dies, Halves, Service tasks (an example row each) and an Explanation sheet.
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...DIE_EDITORS);
	return new Response(Buffer.from(await dieTemplateXlsx()), {
		headers: {
			'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
			'content-disposition': 'attachment; filename="castellan-die-import.xlsx"'
		}
	});
};
