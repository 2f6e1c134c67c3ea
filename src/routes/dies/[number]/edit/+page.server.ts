import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { barToPsi } from '$lib/calc/units';
import { dieFormSchema } from '$lib/schemas/die';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { dieFormChoices } from '$lib/server/dies/die-form-data';
import { updateDie } from '$lib/server/dies/die-write';
import { DIE_EDITORS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...DIE_EDITORS);
	const die = await loadPlantDie(event.params.number);
	const us = user.unitSystem === 'us';
	const [form, choices] = await Promise.all([
		superValidate(
			{
				number: die.number,
				partName: die.part_name,
				partNumber: die.part_number ?? undefined,
				customerId: die.customer_id,
				alloyId: die.alloy_id,
				process: die.process,
				cavities: die.cavities,
				projectedAreaCm2: die.projected_area_cm2,
				hasSlides: die.has_slides === 1,
				metalPressure:
					die.metal_pressure_bar === null
						? undefined
						: us
							? Math.round(barToPsi(die.metal_pressure_bar))
							: die.metal_pressure_bar,
				metalPressureUnit: us ? 'psi' : 'bar',
				location: die.location ?? undefined,
				notes: die.notes ?? undefined,
				expectedLifeShots: die.expected_life_shots ?? undefined,
				replacementLeadDays: die.replacement_lead_days ?? undefined,
				plannedShotsPerHour: die.shots_per_hour ?? undefined
			},
			zod4(dieFormSchema)
		),
		dieFormChoices(getDb())
	]);
	return { form, number: die.number, ...choices };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(dieFormSchema));
		if (!form.valid) return fail(400, { form });
		const result = await updateDie(getDb(), die.id, form.data, user.id);
		if (!result.ok) return setError(form, result.field as 'number', result.message);
		redirect(303, `/dies/${result.number}`);
	}
};
