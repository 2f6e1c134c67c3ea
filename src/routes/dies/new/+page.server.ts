import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { dieFormSchema } from '$lib/schemas/die';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { dieFormChoices } from '$lib/server/dies/die-form-data';
import { createDie } from '$lib/server/dies/die-write';
import { DIE_EDITORS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, ...DIE_EDITORS);
	const [form, choices] = await Promise.all([
		superValidate({ cavities: 1, process: 'cold_chamber', steel: 'H13' }, zod4(dieFormSchema), {
			errors: false
		}),
		dieFormChoices(getDb())
	]);
	return { form, ...choices };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const form = await superValidate(event.request, zod4(dieFormSchema));
		if (!form.valid) return fail(400, { form });
		const result = await createDie(getDb(), form.data, user.id);
		if (!result.ok) return setError(form, result.field as 'number', result.message);
		redirect(303, `/dies/${result.number}`);
	}
};
