import { API_EXAMPLES, curlCommand } from '$lib/api-examples';
import { API_SCOPES } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	return {
		// The address this page was reached at, so the examples run as they are copied.
		origin: event.url.origin,
		scopes: [...API_SCOPES],
		examples: API_EXAMPLES.map((e) => ({
			id: e.id,
			title: e.title,
			note: e.note,
			command: curlCommand(e)
		}))
	};
};
