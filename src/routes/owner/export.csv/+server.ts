import { ownerDieQuerySchema } from '$lib/schemas/owner';
import { csvResponse } from '$lib/server/csv';
import { getDb } from '$lib/server/db';
import { requireOwner } from '$lib/server/owner/guard';
import {
	describeLastJob,
	findOwnerCustomer,
	loadOwnerDies,
	pageOwnerDies
} from '$lib/server/owner/portfolio';
import { nowIso } from '$lib/server/time';
import { plantDate, plantToday } from '$lib/plant-time';
import type { RequestHandler } from './$types';

// The owner's dies as filtered and sorted on screen, every page of them.
export const GET: RequestHandler = async (event) => {
	const { customerId } = requireOwner(event);
	const db = getDb();
	const query = ownerDieQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const [customer, dies] = await Promise.all([
		findOwnerCustomer(db, customerId),
		loadOwnerDies(db, customerId)
	]);
	const { rows } = pageOwnerDies(dies, { ...query, page: 1, size: Number.MAX_SAFE_INTEGER });
	return csvResponse(
		`tooling-${customer?.code ?? 'owner'}-${plantToday(nowIso())}.csv`,
		[
			'die',
			'part',
			'part_number',
			'alloy',
			'status',
			'total_shots',
			'expected_life_shots',
			'life_used_pct',
			'shots_last_28_days',
			'projected_end_of_life',
			'retired_on',
			'next_service',
			'next_service_state',
			'last_toolroom_work'
		],
		rows.map((d) => [
			d.number,
			d.partName,
			d.partNumber ?? '',
			d.alloyName,
			d.status,
			d.totalShots,
			d.expectedLifeShots,
			d.lifeUsedPct.toFixed(1),
			d.shotsLast28Days,
			d.projectedEndOfLife ?? '',
			d.retiredAt ? plantDate(d.retiredAt) : '',
			d.nextService?.kind ?? '',
			d.nextService?.state ?? '',
			describeLastJob(d.lastJob)
		])
	);
};
