import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { diesNearEndOfLife, listServiceAttention } from '$lib/server/dies/attention';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'scheduler', 'admin');
	const db = getDb();
	const [attention, nearEnd, unavailable] = await Promise.all([
		listServiceAttention(db),
		diesNearEndOfLife(db, 90),
		db
			.selectFrom('dies')
			.innerJoin('customers', 'customers.id', 'dies.customer_id')
			.select(['dies.number', 'dies.part_name as partName', 'dies.status', 'customers.name as customerName'])
			.where('dies.status', 'in', ['in_toolroom', 'held'])
			.orderBy('dies.number')
			.execute()
	]);
	return {
		blockedByService: attention.filter((a) => a.state === 'due' || a.state === 'overdue').slice(0, 50),
		comingUp: attention.filter((a) => a.state === 'coming_up').slice(0, 50),
		nearEnd: nearEnd.slice(0, 30),
		unavailable
	};
};
