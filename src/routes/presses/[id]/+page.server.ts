import { error, fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { pressFormSchema } from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listPressUpcoming } from '$lib/server/schedule/bookings';
import { deletePress, findPress, pressToForm, savePress } from '$lib/server/schedule/presses';
import { BOOKING_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

async function loadPress(idParam: string) {
	const id = Number(idParam);
	const press = Number.isInteger(id) && id > 0 ? await findPress(getDb(), id) : undefined;
	if (!press) error(404, { message: 'There is no such press.' });
	return press;
}

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const press = await loadPress(event.params.id);
	const [form, upcoming] = await Promise.all([
		superValidate(pressToForm(press, user.unitSystem), zod4(pressFormSchema)),
		listPressUpcoming(getDb(), press.id)
	]);
	return {
		press,
		form,
		upcoming,
		unitSystem: user.unitSystem,
		canEdit: BOOKING_EDITORS.includes(user.role)
	};
};

export const actions: Actions = {
	save: async (event) => {
		const user = requireRole(event, ...BOOKING_EDITORS);
		const press = await loadPress(event.params.id);
		const form = await superValidate(event.request, zod4(pressFormSchema));
		if (!form.valid) return fail(400, { form });
		const result = await savePress(getDb(), form.data, user.unitSystem, user.id, press.id);
		if (!result.ok) return setError(form, result.field, result.message);
		return message(form, `${form.data.name} saved.`);
	},
	delete: async (event) => {
		const user = requireRole(event, ...BOOKING_EDITORS);
		const press = await loadPress(event.params.id);
		const result = await deletePress(getDb(), press.id, user.id);
		if (!result.ok) return fail(409, { deleteError: result.message });
		redirect(303, '/presses');
	}
};
