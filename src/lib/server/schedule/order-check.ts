import { TYPICAL_SHOTS_PER_HOUR } from '../../calc/life';
import { checkOrder, type OrderCheck } from '../../calc/order-check';
import { conditionalSurvival } from '../../calc/weibull';
import { serviceKindLabel } from '../../labels';
import type { DB } from '../db/connect';
import type { DieScope } from '../dies/register';
import { viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';
import { chamberChecks, dieClampRequirement, type BookingCheck } from './booking-checks';
import { defaultShotsPerHour, loadDieFacts, type DieFacts } from './die-facts';
import { fitFleetByFamily } from './fleet-fit';
import { findPressByName, type Press } from './presses';

const DAY_MS = 86_400_000;

export interface OrderCheckRequest {
	die: string;
	parts: number;
	scrapPct: number;
	press?: string | null;
	shotsPerHour?: number | null;
}

export interface OrderCheckAnswer {
	die: DieFacts;
	press: Press | null;
	shotsPerHour: number;
	rateIsDefault: boolean;
	typicalRate: { min: number; max: number };
	order: OrderCheck;
	/** The shot-counted service task that falls due first, with the shots left to it. */
	nextService: { kind: string; label: string; shotsRemaining: number } | null;
	/** The calendar-kept task that falls due first, with its date. */
	nextServiceByDate: { kind: string; label: string; dueOn: string } | null;
	shotsToEndOfLife: number;
	clamp: {
		requiredKn: number;
		metalPressureBar: number;
		availableKn: number | null;
		fits: boolean | null;
	};
	pressFindings: BookingCheck[];
	survival:
		| { probability: number; shape: number; scale: number; failures: number; suspensions: number }
		| { probability: null; reason: string };
}

/**
 * Can this die make the order: shots needed, press hours, the first limit that blocks (next
 * service or end of life, calc/order-check), clamping force against the press, and the chance the
 * die lasts the run from the fleet's Weibull fit for its alloy family.
 */
export async function runOrderCheck(
	db: DB,
	req: OrderCheckRequest,
	scope: DieScope,
	now = nowIso()
): Promise<
	{ ok: true; answer: OrderCheckAnswer } | { ok: false; field: 'die' | 'press'; message: string }
> {
	const [die, press] = await Promise.all([
		loadDieFacts(db, req.die, scope, now),
		req.press ? findPressByName(db, req.press) : Promise.resolve(null)
	]);
	if (!die)
		return { ok: false, field: 'die', message: `There is no die ${req.die.toUpperCase()}.` };
	if (req.press && !press)
		return { ok: false, field: 'press', message: `There is no press ${req.press}.` };

	const shotsPerHour = req.shotsPerHour ?? defaultShotsPerHour(die.family);
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
	const shotsToEndOfLife = die.expectedLifeShots - die.totalShots;
	const order = checkOrder({
		parts: req.parts,
		cavities: die.cavities,
		scrapPct: req.scrapPct,
		shotsPerHour,
		shotsToNextService: nextService?.shotsRemaining ?? null,
		shotsToEndOfLife
	});
	const { requiredKn, metalPressureBar } = dieClampRequirement(die);

	const fits = await fitFleetByFamily(db);
	const family = fits.find((f) => f.family === die.family)!;
	const survival: OrderCheckAnswer['survival'] = family.fit
		? {
				probability: conditionalSurvival(
					die.totalShots,
					order.shotsNeeded,
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
			die,
			press: press ?? null,
			shotsPerHour,
			rateIsDefault: req.shotsPerHour == null,
			typicalRate: TYPICAL_SHOTS_PER_HOUR[die.family],
			order,
			nextService,
			nextServiceByDate,
			shotsToEndOfLife,
			clamp: {
				requiredKn,
				metalPressureBar,
				availableKn: press?.clamp_force_kn ?? null,
				fits: press ? press.clamp_force_kn >= requiredKn : null
			},
			pressFindings: press ? chamberChecks(die, press) : [],
			survival
		}
	};
}
