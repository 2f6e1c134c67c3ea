import { serviceState, serviceStateRank } from '../../calc/service';
import type { ServiceTask } from '../db/schema';

export interface ServiceTaskView {
	id: number;
	kind: string;
	intervalShots: number | null;
	intervalDays: number | null;
	lastDoneAt: string;
	lastDoneShots: number;
	shotsSinceDone: number;
	daysSinceDone: number;
	state: 'on_track' | 'coming_up' | 'due' | 'overdue';
	fraction: number;
	shotsRemaining: number | null;
	daysRemaining: number | null;
}

const DAY_MS = 86_400_000;

/** A service task's due state from the die's running total, worst-first sortable. */
export function viewServiceTask(
	task: Pick<
		ServiceTask,
		'id' | 'kind' | 'interval_shots' | 'interval_days' | 'last_done_at' | 'last_done_shots'
	>,
	dieTotalShots: number,
	asOf: string,
	threshold = 0.9
): ServiceTaskView {
	const shotsSinceDone = Math.max(0, dieTotalShots - task.last_done_shots);
	const daysSinceDone = Math.max(0, (Date.parse(asOf) - Date.parse(task.last_done_at)) / DAY_MS);
	const s = serviceState({
		intervalShots: task.interval_shots,
		intervalDays: task.interval_days,
		shotsSinceDone,
		daysSinceDone,
		threshold
	});
	return {
		id: task.id,
		kind: task.kind,
		intervalShots: task.interval_shots,
		intervalDays: task.interval_days,
		lastDoneAt: task.last_done_at,
		lastDoneShots: task.last_done_shots,
		shotsSinceDone,
		daysSinceDone: Math.floor(daysSinceDone),
		...s
	};
}

/** Worst first: by state band, then by how far through its interval. */
export function sortWorstFirst<T extends { state: ServiceTaskView['state']; fraction: number }>(
	tasks: T[]
): T[] {
	return [...tasks].sort(
		(a, b) => serviceStateRank(b.state) - serviceStateRank(a.state) || b.fraction - a.fraction
	);
}
