import { lifeExpectedSql, lifeShotsSql, lifeUsedPctOf } from '../dies/life';
import { serviceKindLabel, SERVICE_STATE_LABELS } from '../../labels';
import type { DB } from '../db/connect';
import { viewServiceTask } from '../dies/service-summary';
import type { NoticeItem } from './types';

/** Life used thresholds (percent) that earn a notice, highest first. */
export const LIFE_NOTICE_THRESHOLDS = [100, 90] as const;

/**
 * Everything the toolroom should hear about as of `asOf`: each active service task of a die not
 * retired that stands at coming up, due or overdue, and each such die past 90 % or 100 % of its
 * expected life (the die's own figure, else its alloy's).
 *
 * Only the current state is reported: a task that jumped from on track to overdue between runs
 * gives one overdue item, not three. The key names the cycle (the task's last done date, the
 * die's expected life) so the next cycle is news again while this one never is twice.
 */
export async function findNoticeItems(
	db: DB,
	asOf: string,
	threshold = 0.9
): Promise<NoticeItem[]> {
	if (!(threshold > 0 && threshold <= 1)) {
		throw new RangeError('The coming-up threshold must be above 0 and at most 1.');
	}
	const [tasks, dies] = await Promise.all([
		db
			.selectFrom('service_tasks')
			.innerJoin('dies', 'dies.id', 'service_tasks.die_id')
			.select([
				'service_tasks.id',
				'service_tasks.die_id',
				'service_tasks.kind',
				'service_tasks.interval_shots',
				'service_tasks.interval_days',
				'service_tasks.last_done_at',
				'service_tasks.last_done_shots',
				'dies.total_shots'
			])
			.where('service_tasks.active', '=', 1)
			.where('dies.status', '!=', 'retired')
			.execute(),
		db
			.selectFrom('dies')
			.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
			.innerJoin('customers', 'customers.id', 'dies.customer_id')
			.select([
				'dies.id',
				'dies.number',
				'dies.part_name',
				'dies.total_shots',
				'customers.name as customer_name',
				// Life follows the steel: the most-worn active half (dies/life.ts).
				lifeShotsSql.as('life_shots'),
				lifeExpectedSql.as('expected_life')
			])
			.where('dies.status', '!=', 'retired')
			.orderBy('dies.number')
			.execute()
	]);

	const dieById = new Map(dies.map((d) => [d.id, d]));
	const items: NoticeItem[] = [];

	for (const task of tasks) {
		const die = dieById.get(task.die_id);
		if (!die) continue;
		let view;
		try {
			view = viewServiceTask(task, task.total_shots, asOf, threshold);
		} catch (error) {
			// One task with a broken interval must not silence the notices for the whole plant.
			console.warn(`Service task ${task.id} skipped: ${(error as Error).message}`);
			continue;
		}
		if (view.state === 'on_track') continue;
		const state = view.state;
		items.push({
			key: `svc:${task.id}:${task.last_done_at}:${state}`,
			kind: 'service',
			level: state,
			dieId: die.id,
			subject: `${die.number} · ${serviceKindLabel(task.kind)} · ${SERVICE_STATE_LABELS[state]}`,
			payload: {
				kind: 'service',
				dieNumber: die.number,
				partName: die.part_name,
				customerName: die.customer_name,
				taskId: task.id,
				taskKind: task.kind,
				state,
				fraction: view.fraction,
				intervalShots: view.intervalShots,
				intervalDays: view.intervalDays,
				shotsRemaining: view.shotsRemaining,
				daysRemaining: view.daysRemaining,
				lastDoneAt: view.lastDoneAt
			}
		});
	}

	for (const die of dies) {
		const expected = Number(die.expected_life);
		if (!(expected > 0)) continue;
		const lifeUsedPct = lifeUsedPctOf({ lifeShots: die.life_shots, lifeExpectedShots: expected });
		const passed = LIFE_NOTICE_THRESHOLDS.find((t) => lifeUsedPct >= t);
		if (passed === undefined) continue;
		items.push({
			key: `life:${die.id}:${expected}:${passed}`,
			kind: 'life',
			level: passed === 100 ? 'life_100' : 'life_90',
			dieId: die.id,
			subject: `${die.number} · ${Math.floor(lifeUsedPct)} % of expected life used`,
			payload: {
				kind: 'life',
				dieNumber: die.number,
				partName: die.part_name,
				customerName: die.customer_name,
				threshold: passed,
				lifeUsedPct,
				totalShots: die.life_shots,
				expectedLifeShots: expected
			}
		});
	}

	return items;
}
