import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { ownerAnswerSchema } from '$lib/schemas/die';
import { sendNoticesSoon } from '$lib/server/notices/cron';
import { answerOwnerDecision, loadDecisionCard } from '$lib/server/owner/decisions';
import { getDb } from '$lib/server/db';
import { dieLife } from '$lib/server/dies/die-detail';
import { findOwnerDie, getOwnerDieStory } from '$lib/server/owner/die-page';
import { requireOwner } from '$lib/server/owner/guard';
import { lastServiceText } from '$lib/server/owner/service-history';
import { nowIso } from '$lib/server/time';
import type { Actions, PageServerLoad } from './$types';

// Another owner's die answers 404 — the same as a die that does not exist.
export const load: PageServerLoad = async (event) => {
	const { customerId } = requireOwner(event);
	const db = getDb();
	const die = await findOwnerDie(db, customerId, event.params.number);
	if (!die) error(404, { message: 'This die is not among your tooling.' });
	const asOf = nowIso();
	const [life, story, decisions] = await Promise.all([
		dieLife(db, die, asOf),
		getOwnerDieStory(db, die, asOf),
		loadDecisionCard(db, die.id)
	]);
	// The form answers the open question; its id travels in the form's data, not only the page.
	const answerForm = await superValidate(
		{ decision: decisions.open?.id ?? 0, answer: '' as const, text: '' },
		zod4(ownerAnswerSchema),
		{ errors: false }
	);
	return {
		die: {
			number: die.number,
			partName: die.part_name,
			partNumber: die.part_number,
			status: die.status,
			alloyName: die.alloyName,
			cavities: die.cavities,
			totalShots: die.total_shots,
			expectedLifeShots: die.expectedLifeShots,
			retiredAt: die.retired_at
		},
		life,
		...story,
		decisions,
		answerForm,
		// The same words as the statement PDF and CSV (service-history.ts).
		lastService: lastServiceText(story.history.last)
	};
};

export const actions: Actions = {
	// The owner's one answer to the plant's question; another owner's die is 404, a second
	// answer 409 (the first stands).
	answer: async (event) => {
		const { user, customerId } = requireOwner(event);
		if (!(await findOwnerDie(getDb(), customerId, event.params.number))) {
			error(404, { message: 'This die is not among your tooling.' });
		}
		const form = await superValidate(event.request, zod4(ownerAnswerSchema));
		if (!form.valid) return fail(400, { answerForm: form });
		const result = await answerOwnerDecision(getDb(), {
			customerId,
			dieNumber: event.params.number,
			decisionId: form.data.decision,
			answer: form.data.answer,
			text: form.data.text,
			userId: user.id
		});
		if (!result.ok) {
			if (result.status === 404) error(404, { message: result.message });
			return message(form, result.message, { status: result.status });
		}
		if (result.queued) sendNoticesSoon();
		return message(form, 'Your answer is sent to the toolroom.');
	}
};
