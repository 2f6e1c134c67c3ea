import { serviceState, type ServiceState } from '../../calc/service';
import type { DB } from '../db/connect';

export interface DieStateChange {
	number: string;
	partName: string;
	totalShots: number;
	from: ServiceState;
	to: ServiceState;
}

/**
 * A die's life state against an expected life, with the service-task bands (on track, coming up
 * from 90 %, due from 100 %, overdue from 110 %) so that life reads like every other interval.
 */
export function lifeState(totalShots: number, expectedLifeShots: number): ServiceState {
	return serviceState({
		intervalShots: expectedLifeShots,
		intervalDays: null,
		shotsSinceDone: totalShots,
		daysSinceDone: 0
	}).state;
}

/**
 * The dies whose life state changes when an alloy's expected life goes from its stored value to
 * `newLife`: dies of that alloy that are not retired and have no expected life of their own.
 */
export async function previewAlloyLifeChange(
	db: DB,
	alloyId: number,
	newLife: number
): Promise<{ before: number; after: number; dies: number; changes: DieStateChange[] } | null> {
	const alloy = await db
		.selectFrom('alloys')
		.select('expected_life_shots')
		.where('id', '=', alloyId)
		.executeTakeFirst();
	if (!alloy) return null;
	const dies = await db
		.selectFrom('dies')
		.select(['number', 'part_name', 'total_shots'])
		.where('alloy_id', '=', alloyId)
		.where('status', '!=', 'retired')
		.where('expected_life_shots', 'is', null)
		.orderBy('number')
		.execute();
	const changes = dies
		.map((d) => ({
			number: d.number,
			partName: d.part_name,
			totalShots: d.total_shots,
			from: lifeState(d.total_shots, alloy.expected_life_shots),
			to: lifeState(d.total_shots, newLife)
		}))
		.filter((c) => c.from !== c.to);
	return { before: alloy.expected_life_shots, after: newLife, dies: dies.length, changes };
}
