import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { correctionSchema, halfReplaceSchema } from '$lib/schemas/shots';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { replaceHalf } from '$lib/server/dies/halves';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { getDieShotsView } from '$lib/server/shots/die-shots';
import { recordShots } from '$lib/server/shots/ledger';
import { formatShots } from '$lib/format';
import { HALF_LABELS } from '$lib/labels';
import { DIE_EDITORS, PLANT_ROLES, SHOT_RECORDERS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

const CORRECTION_FIELDS = { shots: 'shots', countedAt: 'countedAt', note: 'reason' } as const;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const die = await loadPlantDie(event.params.number);
	const view = await getDieShotsView(getDb(), die);
	const cover = view.halves.find((h) => h.active && h.side === 'cover');
	const [replaceForm, correctForm] = await Promise.all([
		superValidate(
			{ side: 'cover', steel: cover?.steel ?? 'H13', hardnessHrc: cover?.hardness_hrc ?? 46 },
			zod4(halfReplaceSchema),
			{ errors: false }
		),
		superValidate(zod4(correctionSchema))
	]);
	return {
		...view,
		expectedLife: die.expectedLifeShots,
		replaceForm,
		correctForm,
		canEdit: DIE_EDITORS.includes(user.role) && die.status !== 'retired',
		canRecord: SHOT_RECORDERS.includes(user.role) && die.status !== 'retired'
	};
};

export const actions: Actions = {
	replaceHalf: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(halfReplaceSchema));
		if (!form.valid) return fail(400, { form });
		const result = await replaceHalf(getDb(), die.id, form.data, user.id);
		if (!result.ok) {
			if (result.field === 'die') return message(form, result.message, { status: 409 });
			return setError(form, result.field, result.message);
		}
		const side = HALF_LABELS[form.data.side];
		const removed = result.removed
			? `${result.removed.serial} retired at ${formatShots(result.removed.shots)} shots; `
			: '';
		return message(form, `${side} replaced: ${removed}${result.installed.serial} starts at 0.`);
	},
	correct: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(correctionSchema));
		const shots = form.data.shots;
		if (!form.valid || shots === undefined) return fail(400, { form });
		const result = await recordShots(
			getDb(),
			[
				{
					die: die.number,
					shots,
					countedAt: form.data.countedAt || undefined,
					note: form.data.reason
				}
			],
			{ userId: user.id, tokenId: null, customerId: null },
			{ source: 'correction' }
		);
		if (!result.ok) {
			const issue = result.issues[0];
			const field = CORRECTION_FIELDS[issue.field as keyof typeof CORRECTION_FIELDS];
			if (!field) return message(form, issue.message, { status: 409 });
			return setError(form, field, issue.message);
		}
		const total = result.dies[0]?.totalShots ?? die.total_shots;
		const signed = `${shots > 0 ? '+' : '−'}${formatShots(Math.abs(shots))}`;
		return message(form, `Correction ${signed} shots posted. Die total now ${formatShots(total)}.`);
	}
};
