import { sql } from 'kysely';
import type { DB } from '../db/connect';
import type { DieListQuery } from '../../schemas/die';
import { sortWorstFirst, viewServiceTask, type ServiceTaskView } from './service-summary';
import { nowIso } from '../time';
import { lifeExpectedSql, lifeShotsSql, lifeUsedPctOf, lifeUsedRatioSql } from './life';
import { compactCode, normaliseDieNumber } from '../../calc/die-number';
import { containsText, ignoringCase } from '../db/portable';

/** Limits what a caller may see: a customer-bound caller sees only its own dies. */
export interface DieScope {
	customerId: number | null;
}

export interface DieListRow {
	id: number;
	number: string;
	partName: string;
	/** The customer's part number, when the plant recorded one. */
	partNumber: string | null;
	customerCode: string;
	customerName: string;
	alloyCode: string;
	family: string;
	status: string;
	totalShots: number;
	expectedLifeShots: number;
	lifeUsedPct: number;
	nextService: ServiceTaskView | null;
}

const expectedLife = sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`;

/** The part number as compactCode() writes it: upper case, no dashes, spaces, dots, slashes or underscores. */
export const COMPACT_PART_NUMBER = sql<string>`replace(replace(replace(replace(replace(upper(dies.part_number), '-', ''), ' ', ''), '_', ''), '.', ''), '/', '')`;

function baseQuery(db: DB, query: Partial<DieListQuery>, scope: DieScope) {
	let q = db
		.selectFrom('dies')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id');
	if (scope.customerId !== null) q = q.where('dies.customer_id', '=', scope.customerId);
	if (query.q) {
		const typed = query.q;
		// What people type for a die number (`d 138`, `D0138`) and part numbers without their
		// dashes and spaces find the die too.
		const number = normaliseDieNumber(typed);
		const compact = compactCode(typed);
		q = q.where((eb) =>
			eb.or([
				...(number ? [eb('dies.number', '=', number)] : []),
				...(compact ? [containsText(db, COMPACT_PART_NUMBER, compact)] : []),
				containsText(db, sql`dies.number`, typed),
				containsText(db, sql`dies.part_name`, typed),
				containsText(db, sql`dies.part_number`, typed),
				containsText(db, sql`customers.name`, typed)
			])
		);
	}
	if (query.status === 'active') q = q.where('dies.status', '!=', 'retired');
	else if (query.status) q = q.where('dies.status', '=', query.status as never);
	if (query.owner) q = q.where('customers.code', '=', query.owner);
	if (query.family) q = q.where('alloys.family', '=', query.family);
	return q;
}

const SORT_COLUMNS = {
	number: sql`dies.number`,
	part: sql`dies.part_name`,
	// Dies without a part number sort after those with one, whichever the direction.
	partNumber: sql`dies.part_number is null, ${ignoringCase(sql`dies.part_number`)}`,
	owner: sql`customers.name`,
	alloy: sql`alloys.code`,
	status: sql`dies.status`,
	shots: sql`dies.total_shots`,
	life: lifeUsedRatioSql
} as const;

/** One page of the die register with life used and the worst service task of each die. */
export async function listDies(
	db: DB,
	query: DieListQuery,
	scope: DieScope,
	asOf = nowIso()
): Promise<{ rows: DieListRow[]; total: number }> {
	const base = baseQuery(db, query, scope);
	const [countRow, rows] = await Promise.all([
		base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
		base
			.select([
				'dies.id',
				'dies.number',
				'dies.part_name as partName',
				'dies.part_number as partNumber',
				'customers.code as customerCode',
				'customers.name as customerName',
				'alloys.code as alloyCode',
				'alloys.family',
				'dies.status',
				'dies.total_shots as totalShots',
				expectedLife.as('expectedLifeShots'),
				lifeShotsSql.as('lifeShots'),
				lifeExpectedSql.as('lifeExpectedShots')
			])
			.orderBy(SORT_COLUMNS[query.sort], query.dir)
			.orderBy('dies.number', 'asc')
			.limit(query.size)
			.offset((query.page - 1) * query.size)
			.execute()
	]);
	const tasksByDie = await worstTasks(
		db,
		rows.map((r) => ({ id: r.id, totalShots: r.totalShots })),
		asOf
	);
	return {
		total: Number(countRow.n),
		rows: rows.map(({ lifeShots, lifeExpectedShots, ...r }) => ({
			...r,
			// Life follows the steel: the most-worn active half (dies/life.ts).
			lifeUsedPct: lifeUsedPctOf({ lifeShots, lifeExpectedShots }),
			nextService: r.status === 'retired' ? null : (tasksByDie.get(r.id) ?? null)
		}))
	};
}

/** The worst active service task for each given die. */
export async function worstTasks(
	db: DB,
	dies: { id: number; totalShots: number }[],
	asOf: string
): Promise<Map<number, ServiceTaskView>> {
	const result = new Map<number, ServiceTaskView>();
	if (dies.length === 0) return result;
	const totals = new Map(dies.map((d) => [d.id, d.totalShots]));
	const tasks = await db
		.selectFrom('service_tasks')
		.selectAll()
		.where('active', '=', 1)
		.where('die_id', 'in', [...totals.keys()])
		.execute();
	const byDie = new Map<number, ServiceTaskView[]>();
	for (const t of tasks) {
		const view = viewServiceTask(t, totals.get(t.die_id) ?? 0, asOf);
		byDie.set(t.die_id, [...(byDie.get(t.die_id) ?? []), view]);
	}
	for (const [dieId, views] of byDie) result.set(dieId, sortWorstFirst(views)[0]);
	return result;
}

/** Owners that may appear in the register's owner filter. */
export async function listOwnerOptions(db: DB, scope: DieScope) {
	return db
		.selectFrom('customers')
		.select(['code', 'name'])
		.$if(scope.customerId !== null, (q) => q.where('id', '=', scope.customerId!))
		.orderBy('name')
		.execute();
}
