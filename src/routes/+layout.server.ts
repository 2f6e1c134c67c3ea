import { plantZone } from '$lib/plant-time';
import { getDb } from '$lib/server/db';
import { plantIdentity } from '$lib/server/settings/plant-identity';
import type { LayoutServerLoad } from './$types';

// Only what the shell needs: who is signed in, the plant's name, and the plant's time zone (set per request by the
// plantTime hook) so the browser shows the same plant times as the server. Every page checks its
// own role.
export const load: LayoutServerLoad = async ({ locals }) => ({
	plantZone: plantZone(),
	/** Heads the sign-in page and the shell (plant-identity.ts). */
	plantName: (await plantIdentity(getDb())).name,
	user: locals.user
		? {
				name: locals.user.name,
				email: locals.user.email,
				role: locals.user.role,
				unitSystem: locals.user.unitSystem
			}
		: null
});
