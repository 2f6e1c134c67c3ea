import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { alloySchema, customerSchema } from '$lib/schemas/settings';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import {
	alloyAuditView,
	findAlloy,
	listAlloys,
	listServiceTemplates,
	saveAlloy
} from '$lib/server/settings/alloys';
import { previewAlloyLifeChange } from '$lib/server/settings/alloy-impact';
import { writeAudit } from '$lib/server/audit';
import { listCustomers, saveCustomer } from '$lib/server/settings/customers';
import { loadPlantZoneForm, savePlantZone } from './plant-time';
import {
	loadPlantIdentityForms,
	saveLeadDefaultsAction,
	savePlantIdentityAction,
	savePlantLogoAction
} from './plant-identity';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const db = getDb();
	const [customers, alloys, templates] = await Promise.all([
		listCustomers(db),
		listAlloys(db),
		listServiceTemplates(db)
	]);
	const editCustomer = customers.find(
		(c) => c.id === Number(event.url.searchParams.get('customer'))
	);
	const editAlloy = alloys.find((a) => a.id === Number(event.url.searchParams.get('alloy')));
	const [customerForm, alloyForm] = await Promise.all([
		superValidate(
			editCustomer
				? {
						id: editCustomer.id,
						code: editCustomer.code,
						name: editCustomer.name,
						contactEmail: editCustomer.contact_email ?? ''
					}
				: undefined,
			zod4(customerSchema),
			{ errors: false }
		),
		superValidate(
			editAlloy
				? {
						id: editAlloy.id,
						code: editAlloy.code,
						name: editAlloy.name,
						family: editAlloy.family,
						expectedLifeShots: editAlloy.expected_life_shots,
						densityKgM3: editAlloy.density_kg_m3 ?? undefined,
						specificHeatJKgK: editAlloy.specific_heat_j_kgk ?? undefined,
						latentHeatJKg: editAlloy.latent_heat_j_kg ?? undefined,
						solidusC: editAlloy.solidus_c ?? undefined,
						liquidusC: editAlloy.liquidus_c ?? undefined,
						pourTempC: editAlloy.pour_temp_c ?? undefined
					}
				: undefined,
			zod4(alloySchema),
			{ errors: false }
		)
	]);
	return {
		customers,
		alloys,
		templates,
		customerForm,
		alloyForm,
		...(await loadPlantZoneForm()),
		...(await loadPlantIdentityForms())
	};
};

export const actions: Actions = {
	zone: savePlantZone,
	identity: savePlantIdentityAction,
	leadDefaults: saveLeadDefaultsAction,
	logo: savePlantLogoAction,
	customer: async (event) => {
		requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(customerSchema));
		if (!form.valid) return fail(400, { customerForm: form });
		const result = await saveCustomer(getDb(), {
			...form.data,
			contactEmail: form.data.contactEmail || null
		});
		if (!result.ok) return setError(form, 'code', result.message);
		return message(form, `Customer ${form.data.code} saved.`);
	},
	alloy: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(alloySchema));
		if (!form.valid) return fail(400, { alloyForm: form });
		const d = form.data;
		const db = getDb();
		const before = d.id ? await findAlloy(db, d.id) : undefined;
		// A new expected life moves dies between life states: show which, and save only once the
		// admin has seen them and confirmed.
		const impact =
			before && before.expected_life_shots !== d.expectedLifeShots
				? await previewAlloyLifeChange(db, d.id!, d.expectedLifeShots)
				: null;
		if (impact && !d.confirmImpact) {
			form.message = impact.changes.length
				? `Not saved yet: ${impact.changes.length} of ${impact.dies} dies change state with this expected life (listed below). Tick the box and save again to confirm.`
				: `Not saved yet: none of the ${impact.dies} dies of this alloy changes state. Tick the box and save again to confirm.`;
			return fail(409, { alloyForm: form, impact });
		}
		const result = await saveAlloy(db, {
			id: d.id,
			code: d.code,
			name: d.name,
			family: d.family,
			expected_life_shots: d.expectedLifeShots,
			density_kg_m3: d.densityKgM3 ?? null,
			specific_heat_j_kgk: d.specificHeatJKgK ?? null,
			latent_heat_j_kg: d.latentHeatJKg ?? null,
			solidus_c: d.solidusC ?? null,
			liquidus_c: d.liquidusC ?? null,
			pour_temp_c: d.pourTempC ?? null,
			source_note: 'Edited in Castellan settings'
		});
		if (!result.ok) return setError(form, 'code', result.message);
		const after = await findAlloy(db, result.id);
		await writeAudit(db, {
			userId: admin.id,
			action: before ? 'alloy.update' : 'alloy.create',
			detail: {
				alloy: d.code,
				before: before ? alloyAuditView(before) : {},
				after: after ? alloyAuditView(after) : {},
				...(impact
					? { diesChangingState: impact.changes.map((c) => `${c.number}: ${c.from} → ${c.to}`) }
					: {})
			}
		});
		form.data.confirmImpact = false;
		return message(form, `Alloy ${d.code} saved.`);
	}
};
