import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { openJobSchema, JOB_KINDS } from '$lib/schemas/toolroom';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import {
	canLeadToolroom,
	canWorkToolroom,
	TOOLROOM_READERS,
	TOOLROOM_WORKERS
} from '$lib/server/toolroom/access';
import {
	listAssignees,
	listDieServiceTasks,
	listJobsForDie,
	openJob
} from '$lib/server/toolroom/jobs';
import {
	findJobOpenedMeanwhile,
	findRecentTwin,
	parseKnownOpenJobs
} from '$lib/server/toolroom/resubmit';
import type { Actions, PageServerLoad } from './$types';

const positiveInt = (value: string | null) => {
	const n = Number(value);
	return Number.isInteger(n) && n > 0 ? n : undefined;
};

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...TOOLROOM_READERS);
	const die = await loadPlantDie(event.params.number);
	const db = getDb();
	const [jobs, tasks, assignees] = await Promise.all([
		listJobsForDie(db, die.id),
		listDieServiceTasks(db, die),
		listAssignees(db)
	]);
	// Opened from a service task (?task=) or a service notice (?notice=): start from that.
	const fromTask = tasks.find((t) => t.id === positiveInt(event.url.searchParams.get('task')));
	const noticeId = positiveInt(event.url.searchParams.get('notice'));
	const kind =
		fromTask && (JOB_KINDS as readonly string[]).includes(fromTask.kind) ? fromTask.kind : 'repair';
	const form = await superValidate(
		{
			kind: kind as (typeof JOB_KINDS)[number],
			half: 'both',
			assignedTo: user.role === 'toolmaker' ? user.id : '',
			serviceTaskIds: fromTask ? [fromTask.id] : [],
			dieToToolroom: true,
			noticeId
		},
		zod4(openJobSchema),
		{ errors: false }
	);
	return {
		jobs,
		tasks,
		assignees,
		form,
		openFrom: fromTask ? 'task' : noticeId ? 'notice' : null,
		canWork: canWorkToolroom(user.role) && die.status !== 'retired',
		canLead: canLeadToolroom(user.role)
	};
};

export const actions: Actions = {
	open: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const die = await loadPlantDie(event.params.number);
		const body = await event.request.formData();
		const form = await superValidate(body, zod4(openJobSchema));
		if (!form.valid) return fail(400, { form });
		// Back and submit again: go to the job the first press opened instead of opening a twin.
		const twin =
			(await findJobOpenedMeanwhile(
				getDb(),
				die.id,
				parseKnownOpenJobs(body.get('knownOpenJobs'))
			)) ??
			(body.get('openAnother') === 'on'
				? null
				: await findRecentTwin(getDb(), {
						dieId: die.id,
						userId: user.id,
						kind: form.data.kind,
						description: form.data.description,
						now: new Date().toISOString()
					}));
		if (twin) redirect(303, `/jobs/${twin}?already=1`);
		const result = await openJob(getDb(), {
			dieId: die.id,
			form: form.data,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			if (result.field) {
				return setError(form, result.field as 'kind', result.message, { status: result.status });
			}
			return message(form, result.message, { status: result.status });
		}
		redirect(303, `/jobs/${result.number}`);
	}
};
