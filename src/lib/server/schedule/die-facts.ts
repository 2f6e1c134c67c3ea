import { sql } from 'kysely';
import { lifeStatus, TYPICAL_SHOTS_PER_HOUR, type AlloyFamily } from '../../calc/life';
import { checkOrder } from '../../calc/order-check';
import type { DB } from '../db/connect';
import type { DieProcess, DieStatus, ServiceTask } from '../db/schema';
import { recentDailyShots } from '../dies/die-detail';
import type { DieScope } from '../dies/register';

/** What the booking checks and the order check need to know about one die. */
export interface DieFacts {
	id: number;
	number: string;
	partName: string;
	customerId: number;
	customerCode: string;
	family: AlloyFamily;
	alloyCode: string;
	process: DieProcess;
	cavities: number;
	projectedAreaCm2: number;
	hasSlides: boolean;
	status: DieStatus;
	totalShots: number;
	expectedLifeShots: number;
	/** Trailing 28-day shot rate, shots per day. */
	shotsPerDay: number;
	/** The reason given with the die's latest change of state, if any. */
	statusReason: string | null;
	tasks: Pick<
		ServiceTask,
		'id' | 'kind' | 'interval_shots' | 'interval_days' | 'last_done_at' | 'last_done_shots'
	>[];
}

/** A die by number within the caller's scope, with its service tasks and shot rate. */
export async function loadDieFacts(
	db: DB,
	number: string,
	scope: DieScope,
	asOf: string
): Promise<DieFacts | null> {
	const die = await db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select([
			'dies.id',
			'dies.number',
			'dies.part_name',
			'dies.customer_id',
			'customers.code as customerCode',
			'alloys.family',
			'alloys.code as alloyCode',
			'dies.process',
			'dies.cavities',
			'dies.projected_area_cm2',
			'dies.has_slides',
			'dies.status',
			'dies.total_shots',
			sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`.as('expectedLife')
		])
		.where('dies.number', '=', number.trim().toUpperCase())
		.$if(scope.customerId !== null, (q) => q.where('dies.customer_id', '=', scope.customerId!))
		.executeTakeFirst();
	if (!die) return null;
	const [tasks, recent, lastStatus] = await Promise.all([
		db
			.selectFrom('service_tasks')
			.select(['id', 'kind', 'interval_shots', 'interval_days', 'last_done_at', 'last_done_shots'])
			.where('die_id', '=', die.id)
			.where('active', '=', 1)
			.execute(),
		recentDailyShots(db, die.id, asOf),
		db
			.selectFrom('audit_log')
			.select('detail')
			.where('die_id', '=', die.id)
			.where('action', '=', 'die.status')
			.orderBy('id', 'desc')
			.limit(1)
			.executeTakeFirst()
	]);
	const life = lifeStatus({
		totalShots: die.total_shots,
		expectedLifeShots: die.expectedLife,
		recentShots: recent,
		asOf
	});
	return {
		id: die.id,
		number: die.number,
		partName: die.part_name,
		customerId: die.customer_id,
		customerCode: die.customerCode,
		family: die.family,
		alloyCode: die.alloyCode,
		process: die.process,
		cavities: die.cavities,
		projectedAreaCm2: die.projected_area_cm2,
		hasSlides: die.has_slides === 1,
		status: die.status,
		totalShots: die.total_shots,
		expectedLifeShots: die.expectedLife,
		shotsPerDay: life.shotsPerDay,
		statusReason: reasonFrom(lastStatus?.detail, die.status),
		tasks
	};
}

function reasonFrom(detail: string | undefined, status: DieStatus): string | null {
	if (!detail) return null;
	try {
		const parsed = JSON.parse(detail) as { to?: string; reason?: unknown };
		// A reason belongs to the state it led to; an older change says nothing about today.
		if (parsed.to !== status || typeof parsed.reason !== 'string') return null;
		return parsed.reason.trim() || null;
	} catch {
		return null;
	}
}

/** Middle of the usual production range for the family (NADCA FAQ), shots per hour. */
export function defaultShotsPerHour(family: AlloyFamily): number {
	const range = TYPICAL_SHOTS_PER_HOUR[family];
	return Math.round((range.min + range.max) / 2);
}

/** Shots an order needs, scrap included (calc/order-check). */
export function shotsNeededFor(parts: number, cavities: number, scrapPct: number): number {
	return checkOrder({
		parts,
		cavities,
		scrapPct,
		shotsPerHour: 1,
		shotsToNextService: null,
		shotsToEndOfLife: null
	}).shotsNeeded;
}
