import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { correctionSchema, entryChangeSchema, halfReplaceSchema } from '$lib/schemas/shots';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { replaceHalf } from '$lib/server/dies/halves';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { getDieShotsView } from '$lib/server/shots/die-shots';
import { changeShotEntry } from '$lib/server/shots/entry-change';
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
	// ?entry=ID (the "Review…" link beside an entry) picks that entry in the change form.
	const picked = Number(event.url.searchParams.get('entry'));
	const pickedEntry = view.entries.find((e) => e.id === picked && !e.voidedAt);
	const [replaceForm, correctForm, changeForm] = await Promise.all([
		superValidate(
			{ side: 'cover', steel: cover?.steel ?? 'H13', hardnessHrc: cover?.hardnessHrc ?? 46 },
			zod4(halfReplaceSchema),
			{ errors: false }
		),
		superValidate(zod4(correctionSchema)),
		superValidate(
			{
				entry: pickedEntry?.id,
				action: pickedEntry?.reviewState === 'to_review' ? 'confirm' : 'correct'
			},
			zod4(entryChangeSchema),
			{ errors: false }
		)
	]);
	return {
		...view,
		expectedLife: die.expectedLifeShots,
		replaceForm,
		correctForm,
		changeForm,
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
	changeEntry: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(entryChangeSchema));
		if (!form.valid) return fail(400, { form });
		const result = await changeShotEntry(getDb(), die.number, form.data, {
			userId: user.id,
			tokenId: null,
			customerId: null
		});
		if (!result.ok) {
			const fields = ['entry', 'shots', 'counterStart', 'counterEnd', 'countedAt', 'reason'];
			if (!fields.includes(result.field)) return message(form, result.message, { status: 409 });
			return setError(form, result.field as 'reason', result.message);
		}
		return message(form, result.message);
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
