// The plant identity and replacement lead-time parts of the settings page: forms and actions.
import { fail, type RequestEvent } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { leadDefaultsSchema, plantIdentitySchema } from '$lib/schemas/plant-identity';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import {
	listLeadDefaults,
	plantIdentity,
	saveLeadDefaults,
	savePlantIdentity,
	savePlantLogo
} from '$lib/server/settings/plant-identity';
import { getPhotoStore } from '$lib/server/photos';
import {
	preparePhotos,
	removePhotoFiles,
	selectedFiles,
	storePhotoFilesWith
} from '$lib/server/photos/store';

export async function loadPlantIdentityForms() {
	const db = getDb();
	const [identity, leads] = await Promise.all([plantIdentity(db), listLeadDefaults(db)]);
	const [identityForm, leadForm] = await Promise.all([
		superValidate(
			{
				name: identity.nameSet ? identity.name : '',
				address: identity.address,
				contactEmail: identity.contactEmail,
				contactPhone: identity.contactPhone,
				statementFooter: identity.statementFooter,
				repairRatePerHour:
					identity.repairRatePerHour === null ? '' : String(identity.repairRatePerHour),
				currency: identity.currency
			},
			zod4(plantIdentitySchema),
			{ id: 'plant-identity', errors: false }
		),
		superValidate(
			{
				zinc: String(leads.zinc),
				magnesium: String(leads.magnesium),
				aluminium: String(leads.aluminium),
				copper: String(leads.copper)
			},
			zod4(leadDefaultsSchema),
			{ id: 'lead-defaults', errors: false }
		)
	]);
	return { identityForm, leadForm, plantName: identity.name, hasLogo: identity.logoFile !== null };
}

export async function savePlantIdentityAction(event: RequestEvent) {
	const user = requireRole(event, 'admin');
	const form = await superValidate(event.request, zod4(plantIdentitySchema), {
		id: 'plant-identity'
	});
	if (!form.valid) return fail(400, { identityForm: form });
	await savePlantIdentity(getDb(), form.data, user.id);
	return message(form, 'Plant identity saved.');
}

export async function saveLeadDefaultsAction(event: RequestEvent) {
	const user = requireRole(event, 'admin');
	const form = await superValidate(event.request, zod4(leadDefaultsSchema), {
		id: 'lead-defaults'
	});
	if (!form.valid) return fail(400, { leadForm: form });
	await saveLeadDefaults(getDb(), form.data, user.id);
	return message(form, 'Replacement lead times saved.');
}

/** Uploads (or removes) the plant logo: checked, re-encoded and stored like a photo. */
export async function savePlantLogoAction(event: RequestEvent) {
	const user = requireRole(event, 'admin');
	const data = await event.request.formData();
	const db = getDb();
	const store = getPhotoStore();
	if (data.get('remove') === '1') {
		const old = await savePlantLogo(db, null, user.id);
		if (old) await removePhotoFiles(store, [logoFiles(old)]);
		return { logo: { ok: true, message: 'Logo removed.' } };
	}
	const prepared = await preparePhotos(selectedFiles(data.getAll('logo')), 1);
	if (!prepared.ok) {
		const detail = prepared.problems.map((p) => `${p.file}: ${p.message}`).join(' ');
		return fail(400, { logo: { ok: false, message: `${prepared.message} ${detail}`.trim() } });
	}
	// The new files go again when the row cannot be saved; the old ones only once it is.
	const old = await storePhotoFilesWith(store, prepared.images, ([stored]) =>
		savePlantLogo(db, stored.thumbFile, user.id)
	);
	if (old) await removePhotoFiles(store, [logoFiles(old)]);
	return { logo: { ok: true, message: 'Logo saved.' } };
}

/** The stored pair of a logo kept by its thumbnail (writePhotoFiles names them together). */
function logoFiles(thumbFile: string) {
	return { thumbFile, fullFile: thumbFile.replace(/\.thumb\.jpg$/, '.jpg') };
}
