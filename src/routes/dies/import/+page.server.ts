import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadImportPage } from '$lib/server/import/page-data';
import {
	commitAction,
	fixAction,
	mappingAction,
	modeAction,
	resolveAction,
	skipAction,
	uploadAction
} from '$lib/server/import/page-actions';
import { DIE_EDITORS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...DIE_EDITORS);
	const draftId = event.url.searchParams.get('draft');
	const data = await loadImportPage(getDb(), draftId, user.id);
	if (draftId && !data.draft)
		error(404, { message: 'That import is not known. Upload the file again.' });
	return data;
};

export const actions: Actions = {
	upload: async (event) =>
		uploadAction(getDb(), event.request, requireRole(event, ...DIE_EDITORS).id),
	mapping: async (event) =>
		mappingAction(getDb(), event.request, requireRole(event, ...DIE_EDITORS).id),
	mode: async (event) => modeAction(getDb(), event.request, requireRole(event, ...DIE_EDITORS).id),
	fix: async (event) => fixAction(getDb(), event.request, requireRole(event, ...DIE_EDITORS).id),
	skip: async (event) => skipAction(getDb(), event.request, requireRole(event, ...DIE_EDITORS).id),
	resolve: async (event) =>
		resolveAction(getDb(), event.request, requireRole(event, ...DIE_EDITORS).id),
	commit: async (event) =>
		commitAction(getDb(), event.request, requireRole(event, ...DIE_EDITORS).id)
};
