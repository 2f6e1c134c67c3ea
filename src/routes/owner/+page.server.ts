import { dieListQuerySchema } from '$lib/schemas/die';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listDies } from '$lib/server/dies/register';
import { scopeOf } from '$lib/server/dies/scope';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'customer');
	const db = getDb();
	const query = dieListQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const scope = scopeOf(user);
	const [list, customer] = await Promise.all([
		listDies(db, query, scope),
		db.selectFrom('customers').select(['name', 'code']).where('id', '=', user.customerId!).executeTakeFirstOrThrow()
	]);
	const all = await listDies(db, { ...query, q: '', status: '', family: '', owner: '', page: 1, size: 100_000 }, scope);
	return {
		query,
		...list,
		customer,
		totals: {
			dies: all.total,
			active: all.rows.filter((r) => r.status !== 'retired').length,
			shots: all.rows.reduce((s, r) => s + r.totalShots, 0),
			nearReplacement: all.rows.filter((r) => r.status !== 'retired' && r.lifeUsedPct >= 90).length
		}
	};
};
