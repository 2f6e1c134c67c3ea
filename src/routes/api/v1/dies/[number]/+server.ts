import { json } from '@sveltejs/kit';
import { ApiError, apiRoute } from '$lib/server/api/respond';
import { authorizeApi } from '$lib/server/auth/principal';
import { getDb } from '$lib/server/db';
import { dieApiView, dieMetalPressureView } from '$lib/server/dies/api-view';
import { findDie } from '$lib/server/dies/die-detail';
import { listHalfLives, loadDieLife } from '$lib/server/dies/life';
import { countToReview } from '$lib/server/shots/review';
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
	const [tasks, life, halves, toReview] = await Promise.all([
		worstTasks(db, [{ id: die.id, totalShots: die.total_shots }], asOf),
		loadDieLife(db, die.id, asOf),
		listHalfLives(db, die.id),
		countToReview(db, [die.id])
	]);
	return json(
		viewFor(audienceOf(principal), 'die', {
			...dieApiView({
				id: die.id,
				number: die.number,
				partName: die.part_name,
				partNumber: die.part_number,
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
			shotsRemaining: life.shotsRemaining,
			...dieMetalPressureView(die),
			shotsPerDay: life.shotsPerDay,
			projectedEndOfLife: life.projectedEndOfLife,
			// Life follows the steel: the figures above are those of the most-worn active half.
			lifeSide: life.lifeSide,
			halves: halves.map((h) => ({
				side: h.side,
				serial: h.serial,
				installedAt: h.installedAt,
				removedAt: h.removedAt,
				shots: h.shots,
				lifeUsedPct: Math.round(h.lifeUsedPct * 100) / 100
			})),
			toReview: toReview.get(die.id) ?? 0
		})
	);
});
