import { redirect } from '@sveltejs/kit';
import { getLucia } from '$lib/server/auth';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async () => redirect(303, '/');

export const actions: Actions = {
	default: async ({ locals, cookies }) => {
		const lucia = getLucia();
		if (locals.session) await lucia.invalidateSession(locals.session.id);
		const blank = lucia.createBlankSessionCookie();
		cookies.set(blank.name, blank.value, { path: '/', ...blank.attributes });
		redirect(303, '/sign-in');
	}
};
