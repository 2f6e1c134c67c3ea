import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { DEFAULT_SCRAP_PCT, toUtcIso } from '$lib/schemas/schedule';
import { freeSlotQuerySchema } from '$lib/schemas/service-windows';
import { BOOKING_EDITORS, PLANT_ROLES } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { findFreeSlots } from '$lib/server/schedule/free-slots';
import type { PageServerLoad } from './$types';

// A GET form like the order check: the question stays in the URL and the page works without JS.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const asked = event.url.searchParams.has('parts');
	const form = asked
		? await superValidate(event.url, zod4(freeSlotQuerySchema))
		: await superValidate(
				{
					die: (event.url.searchParams.get('die') ?? '').toUpperCase().slice(0, 20),
					scrapPct: DEFAULT_SCRAP_PCT
				},
				zod4(freeSlotQuerySchema),
				{ errors: false }
			);
	let answer = null;
	if (asked && form.valid) {
		if (!form.data.die) {
			setError(form, 'die', 'Enter the die number, e.g. D-0107.');
		} else {
			const q = form.data;
			const result = await findFreeSlots(
				getDb(),
				{
					die: q.die,
					parts: q.parts,
					scrapPct: q.scrapPct,
					shotsPerHour: q.shotsPerHour ?? null,
					earliest: q.from ? toUtcIso(q.from) : null
				},
				{ unitSystem: user.unitSystem }
			);
			if (result.ok) answer = result;
			else setError(form, result.field, result.message);
		}
	}
	return { form, answer, canBook: BOOKING_EDITORS.includes(user.role) };
};
