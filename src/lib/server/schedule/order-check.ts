import { TYPICAL_SHOTS_PER_HOUR } from '../../calc/life';
import type { UnitSystem } from '../../calc/units';
import { conditionalSurvival } from '../../calc/weibull';
import { serviceKindLabel } from '../../labels';
import type { DB } from '../db/connect';
import type { DieScope } from '../dies/register';
import { viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';
import { fitFleetByFamily } from './fleet-fit';
import { judgeRun, shotsLeftToEndOfLife, type Assessment, type RunRequest } from './verdict';

const DAY_MS = 86_400_000;

export type OrderCheckRequest = RunRequest;

export interface OrderCheckAnswer extends Assessment {
	typicalRate: { min: number; max: number };
	/** The shot-counted service task that falls due first, with the shots left to it now. */
	nextService: { kind: string; label: string; shotsRemaining: number } | null;
	/** The calendar-kept task that falls due first, with its date. */
	nextServiceByDate: { kind: string; label: string; dueOn: string } | null;
	shotsToEndOfLife: number;
	survival:
		| { probability: number; shape: number; scale: number; failures: number; suspensions: number }
		| { probability: null; reason: string };
}

/**
 * The order-check page's answer: the one verdict (`judgeRun`) plus the figures the page shows
 * around it — the next service by shots and by date, the life left, and the chance the die lasts
 * the run from the fleet's Weibull fit for its alloy family. Only `judgeRun` judges.
 */
export async function runOrderCheck(
	db: DB,
	req: OrderCheckRequest,
	scope: DieScope,
	now = nowIso(),
	unitSystem: UnitSystem = 'metric'
): Promise<
	{ ok: true; answer: OrderCheckAnswer } | { ok: false; field: 'die' | 'press'; message: string }
> {
	const [judged, fits] = await Promise.all([
		judgeRun(db, req, { now, scope, unitSystem }),
		fitFleetByFamily(db)
	]);
	if (!judged.ok) return judged;
	const die = judged.die;

	let nextService: OrderCheckAnswer['nextService'] = null;
	let nextServiceByDate: OrderCheckAnswer['nextServiceByDate'] = null;
	for (const task of die.tasks) {
		const view = viewServiceTask(task, die.totalShots, now);
		if (
			view.shotsRemaining !== null &&
			(nextService === null || view.shotsRemaining < nextService.shotsRemaining)
		) {
			nextService = {
				kind: task.kind,
				label: serviceKindLabel(task.kind),
				shotsRemaining: view.shotsRemaining
			};
		}
		if (task.interval_days !== null) {
			const dueOn = new Date(
				Date.parse(task.last_done_at) + task.interval_days * DAY_MS
			).toISOString();
			if (nextServiceByDate === null || dueOn < nextServiceByDate.dueOn) {
				nextServiceByDate = { kind: task.kind, label: serviceKindLabel(task.kind), dueOn };
			}
		}
	}

	const family = fits.find((f) => f.family === die.family)!;
	const survival: OrderCheckAnswer['survival'] = family.fit
		? {
				probability: conditionalSurvival(
					die.totalShots,
					judged.shotsNeeded,
					family.fit.shape,
					family.fit.scale
				),
				shape: family.fit.shape,
				scale: family.fit.scale,
				failures: family.failures,
				suspensions: family.suspensions
			}
		: { probability: null, reason: family.reason ?? 'No fleet life statistics for this family.' };

	return {
		ok: true,
		answer: {
			...judged,
			typicalRate: TYPICAL_SHOTS_PER_HOUR[die.family],
			nextService,
			nextServiceByDate,
			shotsToEndOfLife: shotsLeftToEndOfLife(die),
			survival
		}
	};
}

/** What the order-check API answers: the verdict, its reasons and the figures behind them. */
export function orderCheckApiView(a: OrderCheckAnswer) {
	return {
		die: a.die.number,
		status: a.die.status,
		verdict: a.verdict,
		reasons: a.reasons.map((r) => ({
			code: r.code,
			level: r.level,
			sentence: r.message,
			number: r.number
		})),
		press: a.press?.name ?? null,
		from: a.startsAt,
		until: a.endsAt,
		cavities: a.die.cavities,
		totalShots: a.die.totalShots,
		shotsNeeded: a.shotsNeeded,
		shotsPerHour: a.shotsPerHour,
		rateIsDefault: a.rateIsDefault,
		pressHours: a.pressHours,
		shotsToEndOfLife: a.shotsToEndOfLife,
		shotsToNextService: a.nextService?.shotsRemaining ?? null,
		nextServiceKind: a.nextService?.kind ?? null,
		clamp: {
			requiredKn: a.clamp.requiredKn,
			metalPressureBar: a.clamp.metalPressureBar,
			pressureIsDefault: a.clamp.pressureIsDefault,
			availableKn: a.clamp.availableKn
		}
	};
}
