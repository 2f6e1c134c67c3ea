import { MS_PER_DAY, parseInstant } from './dates';
import { dateInZone, startOfDayInZone } from './zone';
import type { AlloyFamily } from './life';

/** Service states, worst first. */
export const SERVICE_STATES = ['overdue', 'due', 'coming_up', 'on_track'] as const;
export type ServiceState = (typeof SERVICE_STATES)[number];

/** Default share of the interval from which a task shows as coming up. */
export const DEFAULT_COMING_UP_THRESHOLD = 0.9;
/** Share of the interval at which a task is due. */
export const DUE_FRACTION = 1;
/** Share of the interval from which a due task counts as overdue (10 % grace). */
export const OVERDUE_FRACTION = 1.1;

/** Rank for sorting worst first: overdue 3, due 2, coming_up 1, on_track 0. */
export function serviceStateRank(state: ServiceState): number {
	return SERVICE_STATES.length - 1 - SERVICE_STATES.indexOf(state);
}

interface IntervalInput {
	/** Interval in shots, or null when the task is kept by calendar only. */
	intervalShots: number | null;
	/** Interval in days, or null when the task is kept by shots only. */
	intervalDays: number | null;
	/** Shots on the die since the task was last done. */
	shotsSinceDone: number;
	/** Days since the task was last done. */
	daysSinceDone: number;
}

export interface ServiceStateInput extends IntervalInput {
	/** Fraction of the interval from which the task is "coming up"; default 0.9. */
	threshold?: number;
}

export interface ServiceStatus {
	state: ServiceState;
	/** Largest of shotsSince/intervalShots and daysSince/intervalDays over the set intervals. */
	fraction: number;
	/** Shots left on the shot interval (negative when past it); null without a shot interval. */
	shotsRemaining: number | null;
	/** Days left on the day interval (negative when past it); null without a day interval. */
	daysRemaining: number | null;
}

function checkIntervals(input: IntervalInput): void {
	const { intervalShots, intervalDays, shotsSinceDone, daysSinceDone } = input;
	if (intervalShots === null && intervalDays === null) {
		throw new RangeError('A service task needs an interval in shots, in days, or both.');
	}
	if (intervalShots !== null && !(intervalShots > 0 && Number.isFinite(intervalShots))) {
		throw new RangeError('The shot interval must be a positive number.');
	}
	if (intervalDays !== null && !(intervalDays > 0 && Number.isFinite(intervalDays))) {
		throw new RangeError('The day interval must be a positive number.');
	}
	if (!(shotsSinceDone >= 0) || !Number.isFinite(shotsSinceDone)) {
		throw new RangeError('Shots since the task was done must be zero or more.');
	}
	if (!(daysSinceDone >= 0) || !Number.isFinite(daysSinceDone)) {
		throw new RangeError('Days since the task was done must be zero or more.');
	}
}

/**
 * State of one service task against its shot and/or day interval: on_track below the
 * threshold (default 90 %), coming_up from it, due from 100 %, overdue from 110 %.
 * Bands are plant practice, not a published formula.
 */
export function serviceState(input: ServiceStateInput): ServiceStatus {
	checkIntervals(input);
	const { intervalShots, intervalDays, shotsSinceDone, daysSinceDone } = input;
	const threshold = input.threshold ?? DEFAULT_COMING_UP_THRESHOLD;
	if (!(threshold > 0 && threshold <= DUE_FRACTION)) {
		throw new RangeError('The coming-up threshold must be above 0 and at most 1.');
	}
	const fractions: number[] = [];
	if (intervalShots !== null) fractions.push(shotsSinceDone / intervalShots);
	if (intervalDays !== null) fractions.push(daysSinceDone / intervalDays);
	const fraction = Math.max(...fractions);

	let state: ServiceState = 'on_track';
	if (fraction >= OVERDUE_FRACTION) state = 'overdue';
	else if (fraction >= DUE_FRACTION) state = 'due';
	else if (fraction >= threshold) state = 'coming_up';

	return {
		state,
		fraction,
		shotsRemaining: intervalShots === null ? null : intervalShots - shotsSinceDone,
		daysRemaining: intervalDays === null ? null : intervalDays - daysSinceDone
	};
}

export interface ProjectServiceInput extends IntervalInput {
	/** Current shot rate, shots per day (e.g. `lifeStatus().shotsPerDay`). */
	shotsPerDay: number;
	/** Reference instant (ISO-8601); the projection runs from this instant, not from its date. */
	asOf: string;
	/**
	 * When the task was last done. With it, a day-based task is due on the plant date it was done
	 * plus `intervalDays` calendar days (as `taskDayCount` counts); without it, `daysSinceDone`
	 * days before `asOf`.
	 */
	lastDoneAt?: string;
	/** IANA zone whose calendar dates are answered; default UTC. */
	zone?: string;
}

/** Latest instant a projection reports; beyond it the answer is "not in any useful future". */
const LAST_PROJECTED_MS = Date.parse('9999-12-31T00:00:00Z');

/**
 * Calendar date (`YYYY-MM-DD`, in `zone`) on which the task reaches 100 % of its interval: the
 * earlier of the shot-based instant (the as-of instant plus shots left ÷ `shotsPerDay` days) and
 * the day-based one. The as-of date when already due; null when only a shot interval is set and
 * the die is not running, or the date lies past 9999.
 */
export function projectServiceDue(input: ProjectServiceInput): string | null {
	checkIntervals(input);
	const { intervalShots, intervalDays, shotsSinceDone, daysSinceDone, shotsPerDay, asOf } = input;
	const zone = input.zone ?? 'UTC';
	if (!(shotsPerDay >= 0) || !Number.isFinite(shotsPerDay)) {
		throw new RangeError('The shot rate must be zero or more shots per day.');
	}
	const asOfMs = parseInstant(asOf);
	const candidates: number[] = [];
	if (intervalShots !== null) {
		const left = intervalShots - shotsSinceDone;
		if (left <= 0) candidates.push(asOfMs);
		else if (shotsPerDay > 0) candidates.push(asOfMs + (left / shotsPerDay) * MS_PER_DAY);
	}
	if (intervalDays !== null) {
		const dueMs = input.lastDoneAt
			? dayIntervalDueMs(input.lastDoneAt, intervalDays, zone)
			: asOfMs + (intervalDays - daysSinceDone) * MS_PER_DAY;
		candidates.push(Math.max(asOfMs, dueMs));
	}
	if (candidates.length === 0) return null;
	const due = Math.min(...candidates);
	if (!Number.isFinite(due) || due > LAST_PROJECTED_MS) return null;
	return dateInZone(due, zone);
}

/**
 * Whole calendar days in `zone` from the date a task was done to the date of `asOf` — the count a
 * day-based interval is measured in, so "days since done" and "days remaining" on one row always
 * add up to the interval. Plant practice: a day interval is kept by calendar days.
 */
export function taskDayCount(lastDoneAt: string, asOf: string, zone = 'UTC'): number {
	const from = Date.parse(dateInZone(parseInstant(lastDoneAt), zone));
	const to = Date.parse(dateInZone(parseInstant(asOf), zone));
	return Math.max(0, Math.round((to - from) / MS_PER_DAY));
}

/**
 * Instant (epoch ms) at which a day-based task falls due: the start (plant midnight in `zone`) of
 * the calendar date `intervalDays` days after the date it was done — the moment `taskDayCount`
 * reaches the interval.
 */
export function dayIntervalDueMs(lastDoneAt: string, intervalDays: number, zone = 'UTC'): number {
	const doneDate = Date.parse(dateInZone(parseInstant(lastDoneAt), zone));
	const dueDate = new Date(doneDate + Math.round(intervalDays) * MS_PER_DAY).toISOString();
	return startOfDayInZone(dueDate.slice(0, 10), zone);
}

/** Kinds of recurring service a die gets. */
export const SERVICE_KINDS = [
	'stress_relief',
	'surface_inspection',
	'cooling_flush',
	'teardown'
] as const;
export type ServiceKind = (typeof SERVICE_KINDS)[number];

export const SERVICE_KIND_LABELS: Readonly<Record<ServiceKind, string>> = {
	stress_relief: 'Stress relief',
	surface_inspection: 'Surface inspection',
	cooling_flush: 'Cooling line flush',
	teardown: 'Teardown and overhaul'
};

export interface ServiceTemplate {
	kind: ServiceKind;
	intervalShots: number | null;
	intervalDays: number | null;
}

/**
 * Plant default service plan per alloy family; every interval is editable per die.
 *
 * Stress relief: ../shared/REFERENCES.md "Stress relief" note for H13 dies — first relief after
 * a few thousand shots, then every 10 000–20 000, later 25 000–30 000 (*from memory*, plant
 * practice). Aluminium runs hottest, so 15 000; zinc and magnesium 25 000. Brass dies average only
 * 20 000 shots (NADCA FAQ), so 5 000 to give more than one relief in a die's life.
 * Surface inspection, cooling flush and teardown intervals are plant defaults with no published
 * source; teardown is scaled to the expected life of each family.
 */
export const DEFAULT_SERVICE_TEMPLATES: Readonly<Record<AlloyFamily, readonly ServiceTemplate[]>> =
	{
		aluminium: [
			{ kind: 'stress_relief', intervalShots: 15_000, intervalDays: null },
			{ kind: 'surface_inspection', intervalShots: 10_000, intervalDays: 30 },
			{ kind: 'cooling_flush', intervalShots: null, intervalDays: 90 },
			{ kind: 'teardown', intervalShots: 50_000, intervalDays: 365 }
		],
		magnesium: [
			{ kind: 'stress_relief', intervalShots: 25_000, intervalDays: null },
			{ kind: 'surface_inspection', intervalShots: 10_000, intervalDays: 30 },
			{ kind: 'cooling_flush', intervalShots: null, intervalDays: 90 },
			{ kind: 'teardown', intervalShots: 50_000, intervalDays: 365 }
		],
		zinc: [
			{ kind: 'stress_relief', intervalShots: 25_000, intervalDays: null },
			{ kind: 'surface_inspection', intervalShots: 10_000, intervalDays: 30 },
			{ kind: 'cooling_flush', intervalShots: null, intervalDays: 90 },
			{ kind: 'teardown', intervalShots: 100_000, intervalDays: 365 }
		],
		copper: [
			{ kind: 'stress_relief', intervalShots: 5_000, intervalDays: null },
			{ kind: 'surface_inspection', intervalShots: 2_500, intervalDays: 30 },
			{ kind: 'cooling_flush', intervalShots: null, intervalDays: 90 },
			{ kind: 'teardown', intervalShots: 10_000, intervalDays: 365 }
		]
	};
