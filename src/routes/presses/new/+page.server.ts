import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { DEFAULT_CHANGEOVER, pressFormSchema } from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { savePress } from '$lib/server/schedule/presses';
import { BOOKING_EDITORS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...BOOKING_EDITORS);
	const form = await superValidate(
		{
			chamber: 'cold',
			status: 'available',
			clampUnit: user.unitSystem === 'us' ? 'ust' : 'kN',
			...DEFAULT_CHANGEOVER
		},
		zod4(pressFormSchema),
		{ errors: false }
	);
	return { form, unitSystem: user.unitSystem };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...BOOKING_EDITORS);
		const form = await superValidate(event.request, zod4(pressFormSchema));
		if (!form.valid) return fail(400, { form });
		const result = await savePress(getDb(), form.data, user.unitSystem, user.id);
		if (!result.ok) return setError(form, result.field, result.message);
		redirect(303, `/presses/${result.id}`);
	}
};
