import {
	projectServiceDue,
	serviceState,
	serviceStateRank,
	taskDayCount
} from '../../calc/service';
import { plantZone } from '../../plant-time';
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

/**
 * A service task's due state from the die's running total, worst-first sortable. Days are whole
 * plant calendar days (`taskDayCount`), so days since done and days remaining on one row add up
 * to the interval and agree with the projected due date.
 */
export function viewServiceTask(
	task: Pick<
		ServiceTask,
		'id' | 'kind' | 'interval_shots' | 'interval_days' | 'last_done_at' | 'last_done_shots'
	>,
	dieTotalShots: number,
	asOf: string,
	threshold = 0.9,
	zone = plantZone()
): ServiceTaskView {
	const shotsSinceDone = Math.max(0, dieTotalShots - task.last_done_shots);
	const daysSinceDone = taskDayCount(task.last_done_at, asOf, zone);
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
		daysSinceDone,
		...s
	};
}

/**
 * Plant date a task reaches 100 % of its interval at `shotsPerDay`, from the as-of instant (the
 * one projection the plan, the board and the notices show); null if it never will.
 */
export function projectTaskDue(
	task: Pick<ServiceTask, 'interval_shots' | 'interval_days' | 'last_done_at'>,
	view: Pick<ServiceTaskView, 'shotsSinceDone' | 'daysSinceDone'>,
	shotsPerDay: number,
	asOf: string,
	zone = plantZone()
): string | null {
	return projectServiceDue({
		intervalShots: task.interval_shots,
		intervalDays: task.interval_days,
		shotsSinceDone: view.shotsSinceDone,
		daysSinceDone: view.daysSinceDone,
		lastDoneAt: task.last_done_at,
		shotsPerDay: Math.max(0, shotsPerDay),
		asOf,
		zone
	});
}

/** Worst first: by state band, then by how far through its interval. */
export function sortWorstFirst<T extends { state: ServiceTaskView['state']; fraction: number }>(
	tasks: T[]
): T[] {
	return [...tasks].sort(
		(a, b) => serviceStateRank(b.state) - serviceStateRank(a.state) || b.fraction - a.fraction
	);
}
