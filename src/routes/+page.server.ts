import { redirect } from '@sveltejs/kit';
import { ROLE_HOME } from '$lib/roles';
import type { PageServerLoad } from './$types';

// The front door sends each role to its own home.
export const load: PageServerLoad = async ({ locals }) => {
	if (!locals.user) redirect(303, '/sign-in');
	redirect(303, ROLE_HOME[locals.user.role]);
};
