import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { inspectionSchema, MAX_PHOTOS_PER_UPLOAD } from '$lib/schemas/toolroom';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { MAX_PHOTO_BYTES, MAX_PHOTO_PIXELS } from '$lib/server/photos/process-image';
import { selectedFiles } from '$lib/server/photos/store';
import { getUploadDir } from '$lib/server/photos/upload-dir';
import { canWorkToolroom, TOOLROOM_READERS, TOOLROOM_WORKERS } from '$lib/server/toolroom/access';
import {
	findComparePhotos,
	getSurfaceOverview,
	recordInspection
} from '$lib/server/toolroom/inspections';
import { getJob } from '$lib/server/toolroom/jobs';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...TOOLROOM_READERS);
	const die = await loadPlantDie(event.params.number);
	const db = getDb();
	const params = event.url.searchParams;
	const [overview, compare, form] = await Promise.all([
		getSurfaceOverview(db, die, { zone: params.get('zone') }),
		findComparePhotos(db, die.id, [params.get('a') ?? '', params.get('b') ?? '']),
		superValidate({ shotsAt: die.total_shots, half: 'cover' }, zod4(inspectionSchema), {
			errors: false
		})
	]);
	return {
		...overview,
		compare,
		compareIds: { a: params.get('a') ?? '', b: params.get('b') ?? '' },
		// Recording from a job (the job page links here with ?job=TJ-…): the inspection joins it.
		jobNumber: /^TJ-\d{1,8}$/i.test(params.get('job') ?? '')
			? params.get('job')!.toUpperCase()
			: null,
		form,
		canWork: canWorkToolroom(user.role),
		limits: {
			maxFiles: MAX_PHOTOS_PER_UPLOAD,
			maxMb: Math.round(MAX_PHOTO_BYTES / 1024 / 1024),
			maxMegapixels: MAX_PHOTO_PIXELS / 1e6
		}
	};
};

export const actions: Actions = {
	inspect: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const die = await loadPlantDie(event.params.number);
		let data: FormData;
		try {
			data = await event.request.formData();
		} catch {
			const form = await superValidate(zod4(inspectionSchema));
			return message(form, 'The upload did not arrive whole. Send fewer photos at once.', {
				status: 413
			});
		}
		const form = await superValidate(data, zod4(inspectionSchema));
		if (!form.valid) return fail(400, { form });
		const jobNumber = String(data.get('job') ?? '').trim();
		const job = jobNumber ? await getJob(getDb(), jobNumber) : undefined;
		if (jobNumber && !job) {
			form.message = `There is no toolroom job ${jobNumber}; the inspection was not saved.`;
			return fail(400, { form });
		}
		const result = await recordInspection(getDb(), {
			dieId: die.id,
			jobId: job?.id ?? null,
			form: form.data,
			files: selectedFiles(data.getAll('photos')),
			actor: { userId: user.id, role: user.role },
			uploadDir: getUploadDir()
		});
		if (!result.ok) {
			form.message = result.message;
			return fail(result.status, { form, photoProblems: result.problems });
		}
		const photos = result.photos
			? ` with ${result.photos} photo${result.photos === 1 ? '' : 's'}`
			: '';
		form.message = `Inspection recorded: grade ${form.data.grade} at ${form.data.shotsAt} shots${photos}${job ? ` under ${job.number}` : ''}.`;
		return { form, taskOffer: result.offer };
	}
};
