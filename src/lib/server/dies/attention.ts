import { sql } from 'kysely';
import { lifeUsedRatioSql } from './life';
import type { DB } from '../db/connect';
import { nowIso } from '../time';
import { sortWorstFirst, viewServiceTask, type ServiceTaskView } from './service-summary';

export interface AttentionRow extends ServiceTaskView {
	dieNumber: string;
	partName: string;
	dieStatus: string;
	customerName: string;
}

/** Service tasks of active dies that are coming up, due or overdue, worst first. */
export async function listServiceAttention(
	db: DB,
	asOf = nowIso(),
	threshold = 0.9
): Promise<AttentionRow[]> {
	const rows = await db
		.selectFrom('service_tasks')
		.innerJoin('dies', 'dies.id', 'service_tasks.die_id')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select([
			'service_tasks.id',
			'service_tasks.kind',
			'service_tasks.interval_shots',
			'service_tasks.interval_days',
			'service_tasks.last_done_at',
			'service_tasks.last_done_shots',
			'dies.number as dieNumber',
			'dies.part_name as partName',
			'dies.status as dieStatus',
			'dies.total_shots as totalShots',
			'customers.name as customerName'
		])
		.where('service_tasks.active', '=', 1)
		.where('dies.status', '!=', 'retired')
		.execute();
	const views = rows
		.map((r) => ({
			...viewServiceTask(r, r.totalShots, asOf, threshold),
			dieNumber: r.dieNumber,
			partName: r.partName,
			dieStatus: r.dieStatus,
			customerName: r.customerName
		}))
		.filter((v) => v.state !== 'on_track');
	return sortWorstFirst(views);
}

/** Fleet counts by alloy family and die state, for the plant overview. */
export async function fleetCounts(db: DB) {
	return db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.select([
			'alloys.family',
			'dies.status',
			sql<number>`count(*)`.as('dies'),
			sql<number>`sum(dies.total_shots)`.as('shots')
		])
		.groupBy(['alloys.family', 'dies.status'])
		.execute();
}

/** Active dies at or past the given share of their expected life. */
export async function diesNearEndOfLife(db: DB, minPct = 90, customerId: number | null = null) {
	return db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select([
			'dies.number',
			'dies.part_name as partName',
			'dies.status',
			'customers.name as customerName',
			'dies.total_shots as totalShots',
			sql<number>`100.0 * ${lifeUsedRatioSql}`.as('lifeUsedPct')
		])
		.where('dies.status', '!=', 'retired')
		.where(sql<boolean>`100.0 * ${lifeUsedRatioSql} >= ${minPct}`)
		.$if(customerId !== null, (q) => q.where('dies.customer_id', '=', customerId!))
		.orderBy('lifeUsedPct', 'desc')
		.execute();
}
