import { json } from '@sveltejs/kit';
import { ApiError, apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { dieApiView } from '$lib/server/dies/api-view';
import { findDie, dieLife } from '$lib/server/dies/die-detail';
import { worstTasks } from '$lib/server/dies/register';
import { nowIso } from '$lib/server/time';
import { audienceOf, viewFor } from '$lib/server/owner/customer-fields';

// GET /api/v1/dies/{number}: another owner's die answers 404, exactly like a missing one.
export const GET = apiRoute(async (event) => {
	const principal = await authorizeApi(event, 'dies:read');
	const db = getDb();
	const die = await findDie(db, event.params.number ?? '', { customerId: principal.customerId });
	if (!die) throw new ApiError(404, `There is no die ${event.params.number}.`);
	const asOf = nowIso();
	const [tasks, life] = await Promise.all([
		worstTasks(db, [{ id: die.id, totalShots: die.total_shots }], asOf),
		dieLife(db, die, asOf)
	]);
	return json(
		viewFor(audienceOf(principal), 'die', {
			...dieApiView({
				id: die.id,
				number: die.number,
				partName: die.part_name,
				customerCode: die.customerCode,
				customerName: die.customerName,
				alloyCode: die.alloyCode,
				family: die.family,
				status: die.status,
				totalShots: die.total_shots,
				expectedLifeShots: die.expectedLifeShots,
				lifeUsedPct: life.lifeUsedPct,
				nextService: die.status === 'retired' ? null : (tasks.get(die.id) ?? null)
			}),
			shotsPerDay: life.shotsPerDay,
			projectedEndOfLife: life.projectedEndOfLife
		})
	);
});
