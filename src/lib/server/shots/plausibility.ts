import { MAX_PLAUSIBLE_SHOTS_PER_HOUR, TYPICAL_SHOTS_PER_HOUR } from '../../calc/life';
import type { AlloyFamily, DieProcess } from '../db/schema';

/**
 * The fastest rate a press could plausibly run this die, shots per hour. Hot chamber: up to the
 * small-zinc-part bound (common practice, REFERENCES.md). Cold chamber: twice the top of the
 * NADCA FAQ production range for the family — generous so that only typing errors are caught.
 */
export function maxShotsPerHour(process: DieProcess, family: AlloyFamily): number {
	if (process === 'hot_chamber') return MAX_PLAUSIBLE_SHOTS_PER_HOUR;
	return 2 * TYPICAL_SHOTS_PER_HOUR[family].max;
}

/** Largest count that fits in the elapsed time (at least one minute's worth). */
export function maxShotsIn(elapsedMs: number, perHour: number): number {
	const hours = Math.max(elapsedMs, 60_000) / 3_600_000;
	return Math.ceil(perHour * hours);
}
