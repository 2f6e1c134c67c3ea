import { checkOrder, type OrderCheck } from '../../calc/order-check';
import type { DB } from '../db/connect';
import { dieLife, type FoundDie } from '../dies/die-detail';
import { viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';

export interface DieOrderCheck extends OrderCheck {
	die: string;
	status: string;
	cavities: number;
	totalShots: number;
	/** Shots until the first active task with a shot interval falls due; null without one. */
	shotsToNextService: number | null;
	nextServiceKind: string | null;
	/** Shots left to expected life; 0 for a retired die. */
	shotsToEndOfLife: number;
}

/**
 * Can this die make the order before its next shot-counted service task and before its end of
 * life? Limits come from the kept totals (never the ledger), the arithmetic from lib/calc.
 */
export async function checkDieOrder(
	db: DB,
	die: FoundDie,
	order: { parts: number; scrapPct: number; shotsPerHour: number },
	asOf = nowIso()
): Promise<DieOrderCheck> {
	const [tasks, life] = await Promise.all([
		db
			.selectFrom('service_tasks')
			.select(['id', 'kind', 'interval_shots', 'interval_days', 'last_done_at', 'last_done_shots'])
			.where('die_id', '=', die.id)
			.where('active', '=', 1)
			.where('interval_shots', 'is not', null)
			.execute(),
		dieLife(db, die, asOf)
	]);
	let next: { kind: string; shotsRemaining: number } | null = null;
	for (const t of tasks) {
		const view = viewServiceTask(t, die.total_shots, asOf);
		if (view.shotsRemaining !== null && (!next || view.shotsRemaining < next.shotsRemaining)) {
			next = { kind: view.kind, shotsRemaining: view.shotsRemaining };
		}
	}
	const shotsToEndOfLife = die.status === 'retired' ? 0 : life.shotsRemaining;
	const result = checkOrder({
		parts: order.parts,
		cavities: die.cavities,
		scrapPct: order.scrapPct,
		shotsPerHour: order.shotsPerHour,
		shotsToNextService: next?.shotsRemaining ?? null,
		shotsToEndOfLife
	});
	return {
		die: die.number,
		status: die.status,
		cavities: die.cavities,
		totalShots: die.total_shots,
		shotsToNextService: next?.shotsRemaining ?? null,
		nextServiceKind: next?.kind ?? null,
		shotsToEndOfLife,
		...result
	};
}
