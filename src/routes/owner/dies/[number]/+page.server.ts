import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { dieLife, findDie } from '$lib/server/dies/die-detail';
import { scopeOf } from '$lib/server/dies/scope';
import type { PageServerLoad } from './$types';

// Another owner's die answers 404 — the same as a die that does not exist.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'customer');
	const db = getDb();
	const die = await findDie(db, event.params.number, scopeOf(user));
	if (!die) error(404, { message: `You have no die ${event.params.number}.` });
	const [life, halves] = await Promise.all([
		dieLife(db, die),
		db
			.selectFrom('die_halves')
			.select(['side', 'serial', 'shots', 'installed_at', 'removed_at', 'active'])
			.where('die_id', '=', die.id)
			.orderBy('active', 'desc')
			.execute()
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
			expectedLifeShots: die.expectedLifeShots
		},
		life,
		halves
	};
};
