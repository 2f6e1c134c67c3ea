import { ALLOY_FAMILIES, type AlloyFamily } from '../../calc/life';
import { fitWeibull, weibullB10, type WeibullFit } from '../../calc/weibull';
import type { DB } from '../db/connect';
import { isWearFailure } from '../../domain';

/** Fewest retired dies a family needs before Castellan fits its life distribution. */
export const MIN_FAILURES_FOR_FIT = 3;

export interface FamilyFit {
	family: AlloyFamily;
	/** Dies retired worn out or cracked (failures) and their shots at retirement. */
	failures: number;
	failureShots: number[];
	/** Dies still in service, or retired for other reasons (right-censored), and their shots. */
	suspensions: number;
	suspensionShots: number[];
	/** Maximum-likelihood Weibull fit with its B10 life (shots); null when it cannot be made. */
	fit: (WeibullFit & { b10: number }) | null;
	/** Why there is no fit, in plain words; null when there is one. */
	reason: string | null;
}

/**
 * Fleet life statistics per alloy family: a Weibull fit by maximum likelihood (calc/weibull,
 * NIST/SEMATECH §8.4.1.3) with dies retired worn out or cracked as failures at their total shots
 * and every other die — running, or retired by accident, obsolete part, transfer or recall — as a
 * suspension at its shots (`isWearFailure`). A family with fewer than `minFailures` retired dies gets no
 * fit and a reason instead.
 */
export async function fitFleetByFamily(
	db: DB,
	minFailures = MIN_FAILURES_FOR_FIT
): Promise<FamilyFit[]> {
	const rows = await db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.select(['alloys.family', 'dies.status', 'dies.total_shots', 'dies.retirement_reason'])
		.execute();
	return ALLOY_FAMILIES.map((family) => {
		const mine = rows.filter((r) => r.family === family);
		const failed = (r: (typeof mine)[number]) =>
			r.status === 'retired' && isWearFailure(r.retirement_reason);
		const failureShots = mine
			.filter((r) => failed(r) && r.total_shots > 0)
			.map((r) => r.total_shots);
		// Running dies and dies retired for other reasons than wear: right-censored at their shots.
		const suspensionShots = mine.filter((r) => !failed(r)).map((r) => r.total_shots);
		const base = {
			family,
			failures: failureShots.length,
			failureShots,
			suspensions: suspensionShots.length,
			suspensionShots
		};
		if (failureShots.length < minFailures) {
			return {
				...base,
				fit: null,
				reason:
					failureShots.length === 0
						? `No ${family} die has been retired yet, so there are no failures to fit a life distribution to.`
						: `Only ${failureShots.length} ${family} ${failureShots.length === 1 ? 'die has' : 'dies have'} been retired; at least ${minFailures} are needed for a fit.`
			};
		}
		try {
			const fit = fitWeibull(failureShots, suspensionShots);
			return { ...base, fit: { ...fit, b10: weibullB10(fit.shape, fit.scale) }, reason: null };
		} catch (err) {
			return {
				...base,
				fit: null,
				reason: `The ${family} data cannot be fitted: ${(err as Error).message}`
			};
		}
	});
}
