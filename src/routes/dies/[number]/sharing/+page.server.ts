import { fail, type RequestEvent } from '@sveltejs/kit';
import { shareJobSchema, sharePhotoSchema } from '$lib/schemas/owner';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { listSharing, setJobSharing, setPhotoSharing } from '$lib/server/owner/sharing';
import type { RoleName } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

/** Who decides what the die's owner sees. */
const SHARERS: RoleName[] = ['admin', 'toolroom_lead'];

export const load: PageServerLoad = async (event) => {
	requireRole(event, ...SHARERS);
	const { die } = await event.parent();
	return { sharing: await listSharing(getDb(), die.id) };
};

async function readForm(event: RequestEvent) {
	return Object.fromEntries(await event.request.formData());
}

export const actions: Actions = {
	job: async (event) => {
		const user = requireRole(event, ...SHARERS);
		const die = await loadPlantDie(event.params.number ?? '');
		const parsed = shareJobSchema.safeParse(await readForm(event));
		if (!parsed.success) {
			return fail(400, {
				target: 'job',
				message: parsed.error.issues[0]?.message ?? 'Check the form.'
			});
		}
		const result = await setJobSharing(getDb(), {
			dieId: die.id,
			jobNumber: parsed.data.job,
			ownerSummary: parsed.data.ownerSummary,
			shared: parsed.data.shared,
			actorId: user.id
		});
		if (!result.ok) {
			return fail(result.status, { target: parsed.data.job, message: result.message });
		}
		return { target: parsed.data.job, message: result.message, saved: true };
	},
	photo: async (event) => {
		const user = requireRole(event, ...SHARERS);
		const die = await loadPlantDie(event.params.number ?? '');
		const parsed = sharePhotoSchema.safeParse(await readForm(event));
		if (!parsed.success) {
			return fail(400, {
				target: 'photo',
				message: parsed.error.issues[0]?.message ?? 'Check the form.'
			});
		}
		const result = await setPhotoSharing(getDb(), {
			dieId: die.id,
			publicId: parsed.data.photo,
			shared: parsed.data.shared,
			actorId: user.id
		});
		if (!result.ok) {
			return fail(result.status, { target: parsed.data.photo, message: result.message });
		}
		return { target: parsed.data.photo, message: result.message, saved: true };
	}
};
