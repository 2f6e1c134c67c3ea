import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { PLANT_ROLES } from '$lib/roles';
import { toUtcIso } from '$lib/schemas/schedule';
import {
	cancelWindowSchema,
	serviceWindowFormSchema,
	startWindowSchema
} from '$lib/schemas/service-windows';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import {
	cancelServiceWindow,
	listServiceWindows,
	reserveServiceWindow,
	startServiceWindow,
	WINDOW_EDITORS
} from '$lib/server/schedule/service-windows';
import { TOOLROOM_WORKERS } from '$lib/server/toolroom/access';
import { nowIso } from '$lib/server/time';
import type { Actions, PageServerLoad } from './$types';

const DAY_MS = 86_400_000;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const now = nowIso();
	const die = (event.url.searchParams.get('die') ?? '').trim().toUpperCase().slice(0, 20);
	const [form, windows] = await Promise.all([
		superValidate({ die, kind: 'stress_relief' as const }, zod4(serviceWindowFormSchema), {
			errors: false
		}),
		listServiceWindows(getDb(), {
			start: now,
			end: new Date(Date.parse(now) + 180 * DAY_MS).toISOString()
		})
	]);
	return {
		form,
		windows,
		now,
		canReserve: WINDOW_EDITORS.includes(user.role),
		canStart: TOOLROOM_WORKERS.includes(user.role)
	};
};

async function reserveWindow(event: Parameters<Actions[string]>[0]) {
	const user = requireRole(event, ...WINDOW_EDITORS);
	const form = await superValidate(event.request, zod4(serviceWindowFormSchema));
	if (!form.valid) return fail(400, { form });
	const result = await reserveServiceWindow(
		getDb(),
		{
			die: form.data.die,
			startsAt: toUtcIso(form.data.startsAt)!,
			endsAt: toUtcIso(form.data.endsAt)!,
			kind: form.data.kind,
			note: form.data.note || null
		},
		{ userId: user.id, role: user.role }
	);
	if (!result.ok) {
		const field = (result.field ?? 'die') as 'die' | 'startsAt' | 'endsAt';
		return setError(form, field, result.message, { status: result.status });
	}
	redirect(303, `/service-windows?reserved=${result.id}`);
}

async function cancelWindow(event: Parameters<Actions[string]>[0]) {
	const user = requireRole(event, ...WINDOW_EDITORS);
	const parsed = cancelWindowSchema.safeParse(Object.fromEntries(await event.request.formData()));
	if (!parsed.success)
		return fail(400, { windowError: parsed.error.issues[0]?.message ?? 'Check the form.' });
	const result = await cancelServiceWindow(getDb(), parsed.data.id, parsed.data.reason, {
		userId: user.id,
		role: user.role
	});
	if (!result.ok) return fail(result.status, { windowError: result.message });
	redirect(303, '/service-windows?cancelled=1');
}

async function startWindow(event: Parameters<Actions[string]>[0]) {
	const user = requireRole(event, ...TOOLROOM_WORKERS);
	const parsed = startWindowSchema.safeParse(Object.fromEntries(await event.request.formData()));
	if (!parsed.success) return fail(400, { windowError: 'Choose a service window.' });
	const result = await startServiceWindow(getDb(), parsed.data.id, {
		userId: user.id,
		role: user.role
	});
	if (!result.ok) return fail(result.status, { windowError: result.message });
	redirect(303, `/jobs/${result.jobNumber}`);
}

export const actions: Actions = {
	reserve: reserveWindow,
	cancel: cancelWindow,
	start: startWindow
};
