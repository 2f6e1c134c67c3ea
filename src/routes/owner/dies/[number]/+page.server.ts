import { error } from '@sveltejs/kit';
import { getDb } from '$lib/server/db';
import { dieLife } from '$lib/server/dies/die-detail';
import { findOwnerDie, getOwnerDieStory } from '$lib/server/owner/die-page';
import { requireOwner } from '$lib/server/owner/guard';
import { lastServiceText } from '$lib/server/owner/service-history';
import { nowIso } from '$lib/server/time';
import type { PageServerLoad } from './$types';

// Another owner's die answers 404 — the same as a die that does not exist.
export const load: PageServerLoad = async (event) => {
	const { customerId } = requireOwner(event);
	const db = getDb();
	const die = await findOwnerDie(db, customerId, event.params.number);
	if (!die) error(404, { message: 'This die is not among your tooling.' });
	const asOf = nowIso();
	const [life, story] = await Promise.all([
		dieLife(db, die, asOf),
		getOwnerDieStory(db, die, asOf)
	]);
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
		// The same words as the statement PDF and CSV (service-history.ts).
		lastService: lastServiceText(story.history.last)
	};
};
