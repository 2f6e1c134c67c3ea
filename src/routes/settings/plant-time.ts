// The plant time zone part of the settings page: its form and its action.
import { fail, type RequestEvent } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { listTimeZones } from '$lib/plant-time';
import { plantZoneSchema } from '$lib/schemas/plant-time';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { getPlantTimeZone, savePlantTimeZone } from '$lib/server/settings/plant-time';
import { setNoticeCronZone } from '$lib/server/notices/cron';

export async function loadPlantZoneForm() {
	const plantZone = await getPlantTimeZone(getDb());
	const zoneForm = await superValidate({ timeZone: plantZone }, zod4(plantZoneSchema), {
		id: 'plant-zone',
		errors: false
	});
	return { zoneForm, zones: listTimeZones(), plantZone };
}

export async function savePlantZone(event: RequestEvent) {
	const user = requireRole(event, 'admin');
	const form = await superValidate(event.request, zod4(plantZoneSchema), { id: 'plant-zone' });
	if (!form.valid) return fail(400, { zoneForm: form });
	const result = await savePlantTimeZone(getDb(), form.data.timeZone, user.id);
	if (!result.ok) return fail(400, { zoneForm: form });
	await setNoticeCronZone(form.data.timeZone);
	return message(form, result.message);
}
