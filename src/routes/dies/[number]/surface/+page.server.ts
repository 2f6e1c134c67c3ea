import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import {
	correctInspectionSchema,
	inspectionSchema,
	MAX_PHOTOS_PER_UPLOAD,
	voidRecordSchema,
	zoneSchema
} from '$lib/schemas/toolroom';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { MAX_PHOTO_BYTES, MAX_PHOTO_PIXELS } from '$lib/server/photos/process-image';
import { selectedFiles } from '$lib/server/photos/store';
import { getPhotoStore } from '$lib/server/photos';
import { addDieZone, listDieZones } from '$lib/server/toolroom/zones';
import {
	canLeadToolroom,
	canWorkToolroom,
	TOOLROOM_LEADS,
	TOOLROOM_READERS,
	TOOLROOM_WORKERS
} from '$lib/server/toolroom/access';
import {
	correctInspection,
	findComparePhotos,
	getSurfaceOverview,
	recordInspection,
	voidInspection
} from '$lib/server/toolroom/inspections';
import { getJob } from '$lib/server/toolroom/jobs';
import { voidRecordAction } from '$lib/server/toolroom/void-action';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...TOOLROOM_READERS);
	const die = await loadPlantDie(event.params.number);
	const db = getDb();
	const params = event.url.searchParams;
	const [overview, compare, form, voidForm, correctForm, zoneList, zoneForm] = await Promise.all([
		getSurfaceOverview(db, die, { zone: params.get('zone') }),
		findComparePhotos(db, die.id, [params.get('a') ?? '', params.get('b') ?? '']),
		superValidate({ shotsAt: die.total_shots, half: 'cover' }, zod4(inspectionSchema), {
			errors: false
		}),
		superValidate(zod4(voidRecordSchema), { id: 'voidInspection' }),
		superValidate(zod4(correctInspectionSchema), { id: 'correctInspection' }),
		listDieZones(db, die.id),
		superValidate(zod4(zoneSchema), { id: 'zone' })
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
		voidForm,
		correctForm,
		canWork: canWorkToolroom(user.role),
		canLead: canLeadToolroom(user.role),
		zoneList,
		zoneForm,
		canKeepZones: TOOLROOM_LEADS.includes(user.role),
		limits: {
			maxFiles: MAX_PHOTOS_PER_UPLOAD,
			maxMb: Math.round(MAX_PHOTO_BYTES / 1024 / 1024),
			maxMegapixels: MAX_PHOTO_PIXELS / 1e6
		}
	};
};

export const actions: Actions = {
	zone: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(zoneSchema), { id: 'zone' });
		if (!form.valid) return fail(400, { zoneForm: form });
		const result = await addDieZone(getDb(), die.id, form.data, {
			userId: user.id,
			role: user.role
		});
		if (!result.ok) return setError(form, 'name', result.message);
		return message(form, `Zone “${form.data.name}” added to the ${form.data.half} half.`);
	},
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
			photoStore: getPhotoStore()
		});
		if (!result.ok) {
			if (result.field) return setError(form, result.field, result.message);
			form.message = result.message;
			return fail(result.status, { form, photoProblems: result.problems });
		}
		const photos = result.photos
			? ` with ${result.photos} photo${result.photos === 1 ? '' : 's'}`
			: '';
		form.message = `Inspection recorded: grade ${form.data.grade} at ${form.data.shotsAt} shots${photos}${job ? ` under ${job.number}` : ''}.`;
		return { form, taskOffer: result.offer };
	},

	voidInspection: voidRecordAction(
		'voidInspection',
		(db, { id, ...rest }) => voidInspection(db, { inspectionId: id, ...rest }),
		'Inspection voided: it stays on the timeline, struck through, and leaves grade and trend.'
	),

	correctInspection: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(correctInspectionSchema), {
			id: 'correctInspection'
		});
		if (!form.valid) return fail(400, { correctForm: form });
		const { id, reason, ...values } = form.data;
		const result = await correctInspection(getDb(), {
			dieId: die.id,
			inspectionId: id,
			values,
			reason,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			const field = (result.field ?? 'id') as 'id';
			return setError(form, field, result.message, { status: result.status });
		}
		return message(
			form,
			'Inspection corrected; the old figures stay on the timeline, struck through.'
		);
	}
};
