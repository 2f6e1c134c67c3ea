import { isReorderDue, reorderByDate } from '../../calc/reorder';
import { plantDate } from '../../plant-time';
import type { DB } from '../db/connect';
import { loadDieLives, type DieLife } from './life';

// When a die's owner should order its replacement: the die's life (life.ts: most-worn active
// half, trailing rate, projected end of life) and its replacement lead time (its own, else the
// plant's default for the alloy family). The one place statements, the portal, the API and the
// near-end-of-life notices read "shots remaining", "projected end of life" and "reorder by" from.

export interface ReplacementOutlook extends DieLife {
	/** Days a replacement takes to arrive. */
	leadDays: number;
	/** Where the lead time comes from: the die's own figure or the plant's family default. */
	leadDaysFrom: 'die' | 'family';
	/** Projected end of life less the lead time (`YYYY-MM-DD`), or null without a projection. */
	reorderBy: string | null;
	/** The reorder-by date has come (plant date of `asOf`). */
	reorderDue: boolean;
}

/** Fallback when a plant has somehow removed its family default: 12 weeks (common practice). */
const FALLBACK_LEAD_DAYS = 84;

/** Replacement outlook of many dies at once, by die id. */
export async function loadReplacementOutlooks(
	db: DB,
	dieIds: readonly number[],
	asOf: string
): Promise<Map<number, ReplacementOutlook>> {
	const result = new Map<number, ReplacementOutlook>();
	if (dieIds.length === 0) return result;
	const [lives, leads] = await Promise.all([
		loadDieLives(db, dieIds, asOf),
		db
			.selectFrom('dies')
			.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
			.leftJoin('replacement_lead_defaults as d', 'd.family', 'alloys.family')
			.select(['dies.id', 'dies.replacement_lead_days as own', 'd.lead_days as family'])
			.where('dies.id', 'in', [...new Set(dieIds)])
			.execute()
	]);
	const today = plantDate(asOf);
	for (const lead of leads) {
		const life = lives.get(lead.id);
		if (!life) continue;
		const leadDays = lead.own ?? lead.family ?? FALLBACK_LEAD_DAYS;
		const reorderBy = reorderByDate(life.projectedEndOfLife, leadDays);
		result.set(lead.id, {
			...life,
			leadDays,
			leadDaysFrom: lead.own === null ? 'family' : 'die',
			reorderBy,
			reorderDue: isReorderDue(reorderBy, today)
		});
	}
	return result;
}

/** Replacement outlook of one die (see loadReplacementOutlooks). */
export async function loadReplacementOutlook(
	db: DB,
	dieId: number,
	asOf: string
): Promise<ReplacementOutlook> {
	const outlook = (await loadReplacementOutlooks(db, [dieId], asOf)).get(dieId);
	if (!outlook) throw new Error(`No die with id ${dieId}.`);
	return outlook;
}
