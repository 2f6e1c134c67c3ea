// The fleet life page: per alloy family, the Weibull fit (from schedule/fleet-fit), the data it
// was fitted to with die numbers, a Kaplan–Meier estimate to plot against the fitted curve, and
// each running die's chance to reach its expected life.
import { sql } from 'kysely';
import { ALLOY_FAMILIES, type AlloyFamily } from '../../calc/life';
import {
	conditionalSurvival,
	weibullB10,
	weibullMean,
	weibullQuantile,
	weibullSurvival
} from '../../calc/weibull';
import type { DB } from '../db/connect';
import type { DieStatus, RetirementReason } from '../db/schema';
import { isWearFailure, RETIREMENT_REASONS } from '../../domain';
import { fitFleetByFamily } from '../schedule/fleet-fit';

export interface SurvivalPoint {
	/** Age in shots. */
	shots: number;
	/** Estimated share of dies still in service at that age, 0–1. */
	survival: number;
}

export interface KaplanMeierStep extends SurvivalPoint {
	/** Dies in service just before this age. */
	atRisk: number;
	/** Dies retired at this age. */
	failed: number;
}

/**
 * Kaplan–Meier product-limit estimate of the survival function from failure ages and right-
 * censored (suspension) ages: at each distinct failure age R ← R × (nᵢ − dᵢ)/nᵢ, where nᵢ counts
 * units still in service just before that age. A suspension at the same age as a failure still
 * counts as at risk for it. Source: NIST/SEMATECH e-Handbook of Statistical Methods §8.2.1.5.
 */
export function kaplanMeier(
	failures: readonly number[],
	suspensions: readonly number[] = []
): KaplanMeierStep[] {
	const events = [
		...failures.map((shots) => ({ shots, failed: 1 })),
		...suspensions.map((shots) => ({ shots, failed: 0 }))
	].sort((a, b) => a.shots - b.shots || b.failed - a.failed);
	let atRisk = events.length;
	let survival = 1;
	const steps: KaplanMeierStep[] = [];
	for (let i = 0; i < events.length;) {
		const age = events[i].shots;
		let failed = 0;
		let leaving = 0;
		for (; i < events.length && events[i].shots === age; i++) {
			failed += events[i].failed;
			leaving++;
		}
		if (failed > 0) {
			survival *= (atRisk - failed) / atRisk;
			steps.push({ shots: age, survival, atRisk, failed });
		}
		atRisk -= leaving;
	}
	return steps;
}

/** Kaplan–Meier survival at `shots`: the last step at or before it, 1 before the first. */
export function survivalAt(steps: readonly SurvivalPoint[], shots: number): number {
	let s = 1;
	for (const step of steps) {
		if (step.shots > shots) break;
		s = step.survival;
	}
	return s;
}

export interface FleetDie {
	number: string;
	partName: string;
	status: DieStatus;
	retirementReason: RetirementReason | null;
	shots: number;
	expectedLifeShots: number;
}

export interface RunningDie extends FleetDie {
	/** Chance (0–1) of reaching expected life given its shots so far; null without a fit. */
	chanceToExpected: number | null;
	pastExpected: boolean;
}

export interface FleetFamily {
	family: AlloyFamily;
	/** Retired dies with the shots they made (failures). */
	failures: FleetDie[];
	/** Dies still in service (suspensions). */
	running: RunningDie[];
	/** Dies retired for other reasons than wear (suspensions at their shots). */
	censored: FleetDie[];
	/** Retired dies of the family by reason. */
	retirements: Record<RetirementReason, number>;
	fit: { shape: number; scale: number; b10: number; mean: number } | null;
	/** Why there is no fit, in plain words; null with a fit. */
	reason: string | null;
	kaplanMeier: KaplanMeierStep[];
	/** The fitted survival curve, sampled for the chart; empty without a fit. */
	curve: SurvivalPoint[];
	/** Right end of the chart's shot axis. */
	maxShots: number;
}

const CURVE_POINTS = 80;

async function listFleetDies(db: DB) {
	return db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.select([
			'dies.number',
			'dies.part_name as partName',
			'dies.status',
			'dies.retirement_reason as retirementReason',
			'dies.total_shots as shots',
			'alloys.family',
			sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`.as(
				'expectedLifeShots'
			)
		])
		.orderBy('dies.number')
		.execute();
}

/**
 * Every alloy family's life statistics. Failures and suspensions follow fitFleetByFamily: a die
 * retired worn out or cracked is a failure at its total, every other die a suspension at its total.
 */
export async function buildFleetLife(db: DB): Promise<FleetFamily[]> {
	const [fits, dies] = await Promise.all([fitFleetByFamily(db), listFleetDies(db)]);
	return ALLOY_FAMILIES.map((family) => {
		const mine: FleetDie[] = dies
			.filter((d) => d.family === family)
			.map((d) => ({
				number: d.number,
				partName: d.partName,
				status: d.status,
				retirementReason: d.retirementReason,
				shots: d.shots,
				expectedLifeShots: d.expectedLifeShots
			}));
		const retired = mine.filter((d) => d.status === 'retired');
		const failures = retired
			.filter((d) => isWearFailure(d.retirementReason) && d.shots > 0)
			.sort((a, b) => a.shots - b.shots);
		const censored = retired.filter((d) => !isWearFailure(d.retirementReason));
		const running = mine.filter((d) => d.status !== 'retired');
		const retirements = Object.fromEntries(
			RETIREMENT_REASONS.map((r) => [
				r,
				retired.filter((d) => (d.retirementReason ?? 'worn_out') === r).length
			])
		) as Record<RetirementReason, number>;
		const familyFit = fits.find((f) => f.family === family);
		const fit = familyFit?.fit
			? {
					shape: familyFit.fit.shape,
					scale: familyFit.fit.scale,
					b10: weibullB10(familyFit.fit.shape, familyFit.fit.scale),
					mean: weibullMean(familyFit.fit.shape, familyFit.fit.scale)
				}
			: null;
		const km = kaplanMeier(
			failures.map((d) => d.shots),
			[...running, ...censored].map((d) => d.shots)
		);
		const dataMax = Math.max(0, ...mine.map((d) => d.shots));
		// Show the fitted curve down to 1 % survival, but never stretch the axis past twice the data.
		const fitMax = fit ? weibullQuantile(0.99, fit.shape, fit.scale) : 0;
		const maxShots = Math.max(dataMax, Math.min(fitMax, 2 * dataMax)) || 1;
		const curve = fit
			? Array.from({ length: CURVE_POINTS + 1 }, (_, i) => {
					const shots = (maxShots * i) / CURVE_POINTS;
					return { shots, survival: weibullSurvival(shots, fit.shape, fit.scale) };
				})
			: [];
		return {
			family,
			failures,
			running: running.map((d) => {
				const pastExpected = d.shots >= d.expectedLifeShots;
				return {
					...d,
					pastExpected,
					chanceToExpected: fit
						? conditionalSurvival(
								d.shots,
								Math.max(0, d.expectedLifeShots - d.shots),
								fit.shape,
								fit.scale
							)
						: null
				};
			}),
			censored,
			retirements,
			fit,
			reason: fit ? null : (familyFit?.reason ?? 'No life statistics for this family.'),
			kaplanMeier: km,
			curve,
			maxShots
		};
	});
}
