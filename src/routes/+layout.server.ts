import type { LayoutServerLoad } from './$types';

// Only what the shell needs: who is signed in. Every page checks its own role.
export const load: LayoutServerLoad = async ({ locals }) => ({
	user: locals.user
		? {
				name: locals.user.name,
				email: locals.user.email,
				role: locals.user.role,
				unitSystem: locals.user.unitSystem
			}
		: null
});
