import { z } from 'zod';
import { SERVICE_KINDS } from '../calc/service';
import { optionalWholeNumber, wholeNumber } from './numbers';

/**
 * Plausible bounds for a service interval. Below 100 shots a die would live in the toolroom;
 * above 2 million shots the task would outlast even a zinc die (NADCA FAQ average 500 000 shots).
 * Five years is the longest calendar interval that still reads as a plan. Plant practice, not a
 * published rule.
 */
export const INTERVAL_SHOTS_MIN = 100;
export const INTERVAL_SHOTS_MAX = 2_000_000;
export const INTERVAL_DAYS_MIN = 1;
export const INTERVAL_DAYS_MAX = 1825;

const intervalShots = optionalWholeNumber({
	min: [INTERVAL_SHOTS_MIN, `A shot interval below ${INTERVAL_SHOTS_MIN} shots is not plausible.`],
	max: [
		INTERVAL_SHOTS_MAX,
		'A shot interval above 2 000 000 shots is not plausible; leave it blank to keep the task by calendar only.'
	]
});

const intervalDays = optionalWholeNumber({
	min: [INTERVAL_DAYS_MIN, 'A day interval must be at least 1 day.'],
	max: [
		INTERVAL_DAYS_MAX,
		'A day interval above 1825 days (5 years) is not plausible; leave it blank to keep the task by shots only.'
	]
});

const taskId = wholeNumber({ required: 'Choose a task.', min: [1, 'Choose a task.'] });

const NEEDS_AN_INTERVAL = 'Give an interval in shots, in days, or both.';
const hasInterval = (v: { intervalShots?: number; intervalDays?: number }) =>
	v.intervalShots !== undefined || v.intervalDays !== undefined;

export const taskIntervalsSchema = z
	.object({ taskId, intervalShots, intervalDays })
	.refine(hasInterval, { path: ['intervalShots'], message: NEEDS_AN_INTERVAL });
export type TaskIntervalsForm = z.infer<typeof taskIntervalsSchema>;

export const addTaskSchema = z
	.object({
		// A string, not an enum, so the form starts on "Choose…" rather than the first kind.
		kind: z
			.string({ error: 'Choose the kind of service.' })
			.refine(
				(v) => (SERVICE_KINDS as readonly string[]).includes(v),
				'Choose the kind of service.'
			),
		intervalShots,
		intervalDays
	})
	.refine(hasInterval, { path: ['intervalShots'], message: NEEDS_AN_INTERVAL });
export type AddTaskForm = z.infer<typeof addTaskSchema>;

// Date.parse rolls 2026-02-30 over into March; a real date survives the round trip.
const isCalendarDate = (v: string) => {
	const ms = Date.parse(v);
	return Number.isFinite(ms) && new Date(ms).toISOString().slice(0, 10) === v;
};

export const markDoneSchema = z.object({
	taskId,
	doneOn: z
		.string({ error: 'Enter the date the task was done.' })
		.trim()
		.regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter the date as YYYY-MM-DD.')
		.refine(isCalendarDate, 'That is not a calendar date.'),
	shots: wholeNumber({
		required: 'Enter the die’s shot count when the task was done.',
		min: [0, 'The shot count cannot be negative.']
	})
});
export type MarkDoneForm = z.infer<typeof markDoneSchema>;

export const deactivateTaskSchema = z.object({
	taskId,
	reason: z.string().trim().max(300, 'Keep the reason under 300 characters.').default('')
});
export type DeactivateTaskForm = z.infer<typeof deactivateTaskSchema>;
