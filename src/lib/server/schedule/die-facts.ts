import { loadDieLives } from '../dies/life';
import { sql } from 'kysely';
import { addDaysToDate } from '../../calc/dates';
import { plantDate, plantNoon } from '../../plant-time';
import {
	lifeStatus,
	TRAILING_RATE_DAYS,
	TYPICAL_SHOTS_PER_HOUR,
	type AlloyFamily
} from '../../calc/life';
import { checkOrder } from '../../calc/order-check';
import type { DB } from '../db/connect';
import type { DieProcess, DieStatus, ServiceTask } from '../db/schema';
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
	/** The die's own metal (intensification) pressure, bar; null when not recorded. */
	metalPressureBar: number | null;
	status: DieStatus;
	totalShots: number;
	expectedLifeShots: number;
	/** Shots left before the most-worn active half reaches its expected life (dies/life.ts). */
	shotsToEndOfLife: number;
	/** Trailing 28-day shot rate, shots per day (calc/life). */
	shotsPerDay: number;
	/** The reason given with the die's latest change of state, if any. */
	statusReason: string | null;
	/** The die's own planned rate, shots per hour, over the press's; null when none is recorded. */
	plannedShotsPerHour: number | null;
	tasks: Pick<
		ServiceTask,
		'id' | 'kind' | 'interval_shots' | 'interval_days' | 'last_done_at' | 'last_done_shots'
	>[];
}

const DAY_MS = 86_400_000;
const NOON_MS = DAY_MS / 2;

/**
 * Trailing shot rates of many dies at once, from the daily roll-up. The roll-up dates each day at
 * noon, so the days whose noon falls in (asOf − 28 d, asOf] are summed in SQL and the sum handed
 * to `lifeStatus` — the same window and rate as the die page, without reading every day row.
 */
export async function trailingShotsPerDay(
	db: DB,
	dies: readonly { id: number; totalShots: number; expectedLifeShots: number }[],
	asOf: string
): Promise<Map<number, number>> {
	const rates = new Map<number, number>();
	if (dies.length === 0) return rates;
	const asOfMs = Date.parse(asOf);
	const windowStart = asOfMs - TRAILING_RATE_DAYS * DAY_MS;
	// First day whose noon is after the window start; last day whose noon is not after asOf.
	const firstNoon = plantDate(windowStart - NOON_MS);
	const first =
		Date.parse(plantNoon(firstNoon)) > windowStart ? firstNoon : addDaysToDate(firstNoon, 1);
	const lastNoon = plantDate(asOfMs - NOON_MS);
	const rows = await db
		.selectFrom('shot_daily')
		.select(['die_id', sql<number>`sum(shots)`.as('shots')])
		.where(
			'die_id',
			'in',
			dies.map((d) => d.id)
		)
		.where('day', '>=', first)
		.where('day', '<=', lastNoon)
		.groupBy('die_id')
		.execute();
	const sums = new Map(rows.map((r) => [r.die_id, Number(r.shots)]));
	for (const d of dies) {
		const sum = sums.get(d.id) ?? 0;
		rates.set(
			d.id,
			lifeStatus({
				totalShots: d.totalShots,
				expectedLifeShots: d.expectedLifeShots,
				recentShots: sum === 0 ? [] : [{ at: plantNoon(lastNoon), shots: sum }],
				asOf
			}).shotsPerDay
		);
	}
	return rates;
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

/** Die facts for many dies, by id, in a handful of queries (the planner re-checks in bulk). */
export async function loadDieFactsByIds(
	db: DB,
	ids: readonly number[],
	asOf: string
): Promise<Map<number, DieFacts>> {
	const result = new Map<number, DieFacts>();
	if (ids.length === 0) return result;
	const list = [...new Set(ids)];
	const dies = await db
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
			'dies.metal_pressure_bar',
			'dies.status',
			'dies.total_shots',
			'dies.shots_per_hour',
			sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`.as('expectedLife')
		])
		.where('dies.id', 'in', list)
		.execute();
	const stopped = dies
		.filter((d) => d.status === 'held' || d.status === 'in_toolroom')
		.map((d) => d.id);
	const [lives, tasks, rates, reasons] = await Promise.all([
		loadDieLives(
			db,
			dies.map((d) => d.id),
			asOf
		),
		db
			.selectFrom('service_tasks')
			.select([
				'id',
				'die_id',
				'kind',
				'interval_shots',
				'interval_days',
				'last_done_at',
				'last_done_shots'
			])
			.where('die_id', 'in', list)
			.where('active', '=', 1)
			.execute(),
		trailingShotsPerDay(
			db,
			dies.map((d) => ({ id: d.id, totalShots: d.total_shots, expectedLifeShots: d.expectedLife })),
			asOf
		),
		stopped.length
			? db
					.selectFrom('audit_log')
					.select(['die_id', 'detail'])
					.where('action', '=', 'die.status')
					.where('id', 'in', (eb) =>
						eb
							.selectFrom('audit_log')
							.select((e) => e.fn.max('id').as('id'))
							.where('action', '=', 'die.status')
							.where('die_id', 'in', stopped)
							.groupBy('die_id')
					)
					.execute()
			: Promise.resolve([])
	]);
	const reasonByDie = new Map(reasons.map((r) => [r.die_id, r.detail]));
	for (const d of dies) {
		result.set(d.id, {
			id: d.id,
			number: d.number,
			partName: d.part_name,
			customerId: d.customer_id,
			customerCode: d.customerCode,
			family: d.family,
			alloyCode: d.alloyCode,
			process: d.process,
			cavities: d.cavities,
			projectedAreaCm2: d.projected_area_cm2,
			hasSlides: d.has_slides === 1,
			metalPressureBar: d.metal_pressure_bar,
			status: d.status,
			totalShots: d.total_shots,
			expectedLifeShots: d.expectedLife,
			shotsToEndOfLife: (() => {
				const life = lives.get(d.id);
				return life ? life.lifeExpectedShots - life.lifeShots : d.expectedLife - d.total_shots;
			})(),
			shotsPerDay: rates.get(d.id) ?? 0,
			statusReason: reasonFrom(reasonByDie.get(d.id) ?? undefined, d.status),
			plannedShotsPerHour: d.shots_per_hour,
			tasks: []
		});
	}
	for (const t of tasks) result.get(t.die_id)?.tasks.push(t);
	return result;
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
		.select('id')
		.where('number', '=', number.trim().toUpperCase())
		.$if(scope.customerId !== null, (q) => q.where('customer_id', '=', scope.customerId!))
		.executeTakeFirst();
	if (!die) return null;
	return (await loadDieFactsByIds(db, [die.id], asOf)).get(die.id) ?? null;
}

export type RateSource = 'order' | 'die' | 'press' | 'alloy';

/**
 * The planned rate of a run, shots per hour, and where it came from: the rate given with the
 * order, else the die's own rate, else the press's usual rate, else the middle of the alloy
 * family's usual range. The one place a run's rate is chosen.
 */
export function planRate(
	given: number | null | undefined,
	die: Pick<DieFacts, 'family' | 'plannedShotsPerHour'>,
	press: { shots_per_hour: number | null } | null
): { shotsPerHour: number; source: RateSource } {
	if (given != null) return { shotsPerHour: given, source: 'order' };
	if (die.plannedShotsPerHour != null)
		return { shotsPerHour: die.plannedShotsPerHour, source: 'die' };
	if (press?.shots_per_hour != null) return { shotsPerHour: press.shots_per_hour, source: 'press' };
	return { shotsPerHour: defaultShotsPerHour(die.family), source: 'alloy' };
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
