import { fail, type RequestEvent } from '@sveltejs/kit';
import { message, setError, superValidate, type SuperValidated } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import {
	addTaskSchema,
	deactivateTaskSchema,
	markDoneSchema,
	taskIntervalsSchema
} from '$lib/schemas/service-plan';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import {
	addServiceTask,
	deactivateServiceTask,
	listServicePlan,
	markTaskDone,
	updateTaskIntervals,
	type PlanResult
} from '$lib/server/dies/service-plan';
import { nowIso } from '$lib/server/time';
import { plantToday } from '$lib/plant-time';
import { DIE_EDITORS, PLANT_ROLES, type RoleName } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

/** Who may mark a task done: the toolroom and the admin. */
const DONE_MARKERS: RoleName[] = ['admin', 'toolroom_lead', 'toolmaker'];

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const { die, life } = await event.parent();
	const asOf = nowIso();
	const today = plantToday(asOf);
	const plan = await listServicePlan(getDb(), die, life.shotsPerDay, asOf);
	const tasks = await Promise.all(
		plan.tasks.map(async (t) => {
			const [intervals, done, off] = await Promise.all([
				superValidate(
					{
						taskId: t.id,
						intervalShots: t.intervalShots ?? undefined,
						intervalDays: t.intervalDays ?? undefined
					},
					zod4(taskIntervalsSchema),
					{ id: `intervals-${t.id}`, errors: false }
				),
				superValidate(
					{ taskId: t.id, doneOn: today, shots: die.total_shots },
					zod4(markDoneSchema),
					{
						id: `done-${t.id}`,
						errors: false
					}
				),
				superValidate({ taskId: t.id, reason: '' }, zod4(deactivateTaskSchema), {
					id: `off-${t.id}`,
					errors: false
				})
			]);
			return { ...t, forms: { intervals, done, off } };
		})
	);
	return {
		tasks,
		inactive: plan.inactive,
		today,
		addForm: await superValidate(zod4(addTaskSchema), { id: 'add-task' }),
		canEditPlan: DIE_EDITORS.includes(user.role),
		canMarkDone: DONE_MARKERS.includes(user.role)
	};
};

/** Turns a refusal into the form's field error or form message; nothing was written. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
function answer(form: SuperValidated<any>, result: PlanResult) {
	if (result.ok) return message(form, result.message);
	if (result.field)
		return setError(form, result.field as never, result.message, { status: result.status });
	return message(form, result.message, { status: result.status });
}

async function dieFor(event: RequestEvent<{ number: string }>) {
	return loadPlantDie(event.params.number);
}

export const actions: Actions = {
	intervals: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await dieFor(event);
		const form = await superValidate(event.request, zod4(taskIntervalsSchema));
		if (!form.valid) return fail(400, { form });
		return answer(form, await updateTaskIntervals(getDb(), die, form.data, user.id));
	},
	add: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await dieFor(event);
		const form = await superValidate(event.request, zod4(addTaskSchema));
		if (!form.valid) return fail(400, { form });
		return answer(form, await addServiceTask(getDb(), die, form.data, user.id));
	},
	deactivate: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await dieFor(event);
		const form = await superValidate(event.request, zod4(deactivateTaskSchema));
		if (!form.valid) return fail(400, { form });
		return answer(
			form,
			await deactivateServiceTask(getDb(), die, form.data.taskId, form.data.reason, user.id)
		);
	},
	done: async (event) => {
		const user = requireRole(event, ...DONE_MARKERS);
		const die = await dieFor(event);
		const form = await superValidate(event.request, zod4(markDoneSchema));
		if (!form.valid) return fail(400, { form });
		return answer(form, await markTaskDone(getDb(), die, form.data, user.id));
	}
};
