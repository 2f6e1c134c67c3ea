import { error, fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import {
	assignJobSchema,
	cancelJobSchema,
	closeJobSchema,
	jobRepairSchema,
	jobStatusSchema,
	partUsedSchema,
	photoShareSchema,
	voidJobEntrySchema,
	workEntrySchema,
	voidJobSchema,
	photoStageSchema
} from '$lib/schemas/toolroom';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { selectedFiles } from '$lib/server/photos/store';
import { getPhotoStore } from '$lib/server/photos';
import { TOOLROOM_LEADS, TOOLROOM_READERS, TOOLROOM_WORKERS } from '$lib/server/toolroom/access';
import { voidJob } from '$lib/server/toolroom/job-void';
import { recordPartUsed, recordWorkEntry, voidJobEntry } from '$lib/server/toolroom/job-entries';
import { getJobPage } from '$lib/server/toolroom/job-page';
import {
	assignJob,
	cancelJob,
	closeJob,
	getJob,
	isActiveJob,
	moveJob
} from '$lib/server/toolroom/jobs';
import { recordJobRepairs } from '$lib/server/toolroom/zones';
import { setPhotoShared, uploadPhotos } from '$lib/server/toolroom/photos';
import { announceJobClosed } from '$lib/server/toolroom/announce';
import type { Actions, PageServerLoad } from './$types';

async function loadJob(number: string) {
	const job = await getJob(getDb(), number);
	if (!job) error(404, { message: `There is no toolroom job ${number}.` });
	return job;
}

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...TOOLROOM_READERS);
	const job = await loadJob(event.params.job);
	const [page, closeForm, cancelForm, assignForm, voidForm, workForm, partForm] = await Promise.all(
		[
			getJobPage(getDb(), job, user.role),
			superValidate(zod4(closeJobSchema), { id: 'close' }),
			superValidate(zod4(cancelJobSchema), { id: 'cancel' }),
			superValidate({ assignedTo: job.assigned_to ?? '' }, zod4(assignJobSchema), { id: 'assign' }),
			superValidate(zod4(voidJobSchema), { id: 'void' }),
			superValidate(zod4(workEntrySchema), { id: 'work' }),
			superValidate(zod4(partUsedSchema), { id: 'part' })
		]
	);
	return { ...page, closeForm, cancelForm, assignForm, voidForm, workForm, partForm };
};

export const actions: Actions = {
	void: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const form = await superValidate(event.request, zod4(voidJobSchema), { id: 'void' });
		if (!form.valid) return fail(400, { voidForm: form });
		const result = await voidJob(getDb(), {
			number: event.params.job,
			reason: form.data.reason,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return setError(form, 'reason', result.message, { status: result.status });
		return message(form, 'Job voided: it stays in the history, struck through.');
	},

	status: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const parsed = jobStatusSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { statusError: 'Choose the new status.' });
		const result = await moveJob(getDb(), {
			number: event.params.job,
			to: parsed.data.to,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return fail(result.status, { statusError: result.message });
		return { statusMessage: 'Status changed.' };
	},

	assign: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const form = await superValidate(event.request, zod4(assignJobSchema), { id: 'assign' });
		if (!form.valid) return fail(400, { assignForm: form });
		const result = await assignJob(getDb(), {
			number: event.params.job,
			assignedTo: form.data.assignedTo,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return setError(form, 'assignedTo', result.message, { status: result.status });
		return message(form, 'Assignment saved.');
	},

	close: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const form = await superValidate(event.request, zod4(closeJobSchema), { id: 'close' });
		if (!form.valid) return fail(400, { closeForm: form });
		const result = await closeJob(getDb(), {
			number: event.params.job,
			form: form.data,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			if (result.field === 'hours') {
				return setError(form, 'hours', result.message, { status: result.status });
			}
			return message(form, result.message, { status: result.status });
		}
		await announceJobClosed(getDb(), event.params.job);
		redirect(303, `/jobs/${event.params.job.toUpperCase()}`);
	},

	work: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const form = await superValidate(event.request, zod4(workEntrySchema), { id: 'work' });
		if (!form.valid) return fail(400, { workForm: form });
		const result = await recordWorkEntry(getDb(), {
			number: event.params.job,
			form: form.data,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return message(form, result.message, { status: result.status });
		const h = form.data.hours;
		return message(
			form,
			`${h} hour${h === 1 ? '' : 's'} recorded; the job has ${result.jobHours} h in all.`
		);
	},

	part: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const form = await superValidate(event.request, zod4(partUsedSchema), { id: 'part' });
		if (!form.valid) return fail(400, { partForm: form });
		const result = await recordPartUsed(getDb(), {
			number: event.params.job,
			form: form.data,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return message(form, result.message, { status: result.status });
		return message(form, `Recorded: ${form.data.quantity} × ${form.data.part}.`);
	},

	repair: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const job = await loadJob(event.params.job);
		const parsed = jobRepairSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) {
			return fail(400, { repair: { ok: false, message: parsed.error.issues[0].message } });
		}
		if (!isActiveJob(job.status)) {
			const message = `${job.number} is no longer open; repairs are recorded while it is.`;
			return fail(409, { repair: { ok: false, message } });
		}
		const result = await recordJobRepairs(
			getDb(),
			job.id,
			[{ zoneId: parsed.data.zoneId, kind: parsed.data.kind }],
			{ userId: user.id, role: user.role }
		);
		if (!result.ok) return fail(result.status, { repair: { ok: false, message: result.message } });
		return {
			repair: {
				ok: true,
				message: 'Repair recorded: the zone’s crack trend starts again when the job closes.'
			}
		};
	},

	voidEntry: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const parsed = voidJobEntrySchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) {
			return fail(400, { entryVoid: { ok: false, message: parsed.error.issues[0].message } });
		}
		const result = await voidJobEntry(getDb(), {
			number: event.params.job,
			entry: parsed.data.entry,
			id: parsed.data.id,
			reason: parsed.data.reason,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			return fail(result.status, { entryVoid: { ok: false, message: result.message } });
		}
		return {
			entryVoid: {
				ok: true,
				message: 'Entry voided: it stays on the job, struck through, and leaves the totals.'
			}
		};
	},

	cancel: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const form = await superValidate(event.request, zod4(cancelJobSchema), { id: 'cancel' });
		if (!form.valid) return fail(400, { cancelForm: form });
		const result = await cancelJob(getDb(), {
			number: event.params.job,
			reason: form.data.reason,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return message(form, result.message, { status: result.status });
		redirect(303, `/jobs/${event.params.job.toUpperCase()}`);
	},

	upload: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const job = await loadJob(event.params.job);
		let data: FormData;
		try {
			data = await event.request.formData();
		} catch {
			// The body was cut off: over the server's size limit, or the connection dropped.
			const upload = {
				ok: false,
				message: 'The upload did not arrive whole. Send fewer photos at once.',
				problems: []
			};
			return fail(413, { upload });
		}
		const stage = photoStageSchema.safeParse(data.get('stage') ?? '');
		if (!stage.success) {
			const upload = { ok: false, message: 'Choose before, during or after.', problems: [] };
			return fail(400, { upload });
		}
		const result = await uploadPhotos(getDb(), {
			target: { jobId: job.id },
			files: selectedFiles(data.getAll('photos')),
			caption: String(data.get('caption') ?? ''),
			stage: stage.data,
			actor: { userId: user.id, role: user.role },
			photoStore: getPhotoStore()
		});
		if (!result.ok) {
			return fail(result.status, {
				upload: { ok: false, message: result.message, problems: result.problems }
			});
		}
		return { upload: { ok: true, message: result.message, problems: result.problems } };
	},

	share: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const job = await loadJob(event.params.job);
		const parsed = photoShareSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { shareError: 'Unknown photo.' });
		const result = await setPhotoShared(getDb(), {
			publicId: parsed.data.photo,
			shared: parsed.data.shared,
			dieId: job.die_id,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return fail(result.status, { shareError: result.message });
		return {
			shareMessage: parsed.data.shared ? 'Photo shared with the owner.' : 'Photo no longer shared.'
		};
	}
};
