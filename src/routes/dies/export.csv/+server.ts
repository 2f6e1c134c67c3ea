import { dieListQuerySchema } from '$lib/schemas/die';
import { requireRole } from '$lib/server/auth/guard';
import { csvResponse } from '$lib/server/csv';
import { getDb } from '$lib/server/db';
import { listDies } from '$lib/server/dies/register';
import { scopeOf } from '$lib/server/dies/scope';
import { PLANT_ROLES } from '$lib/roles';
import { plantToday } from '$lib/plant-time';
import type { RequestHandler } from './$types';

// The register as filtered on screen, every page of it.
export const GET: RequestHandler = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const query = dieListQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const { rows } = await listDies(getDb(), { ...query, page: 1, size: 100_000 }, scopeOf(user));
	return csvResponse(
		`castellan-dies-${plantToday()}.csv`,
		[
			'die',
			'part',
			'part_number',
			'owner',
			'alloy',
			'family',
			'status',
			'total_shots',
			'expected_life_shots',
			'life_used_pct',
			'next_service',
			'next_service_state'
		],
		rows.map((r) => [
			r.number,
			r.partName,
			r.partNumber ?? '',
			r.customerName,
			r.alloyCode,
			r.family,
			r.status,
			r.totalShots,
			r.expectedLifeShots,
			r.lifeUsedPct.toFixed(1),
			r.nextService?.kind ?? '',
			r.nextService?.state ?? ''
		])
	);
};
