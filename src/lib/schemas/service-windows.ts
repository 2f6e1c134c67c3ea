import { z } from 'zod';
import { JOB_KINDS } from './toolroom';
import { dateTimeField, MAX_BOOKING_DAYS, orderCheckQuerySchema, toUtcIso } from './schedule';

/** Longest service window; a longer overhaul is a toolroom job with an expected release date. */
export const MAX_WINDOW_DAYS = 30;

/** Reserve a service window on a die: times as a `datetime-local` field sends them (plant time). */
export const serviceWindowFormSchema = z
	.object({
		die: z
			.string({ error: 'Enter the die number.' })
			.trim()
			.toUpperCase()
			.min(1, 'Enter the die number, e.g. D-0107.')
			.max(20, 'A die number has at most 20 characters.'),
		startsAt: dateTimeField('start'),
		endsAt: dateTimeField('end'),
		kind: z.enum(JOB_KINDS, { error: 'Choose what the toolroom will do.' }),
		note: z.string().trim().max(300, 'Keep the note under 300 characters.').default('')
	})
	.superRefine((v, ctx) => {
		const start = Date.parse(toUtcIso(v.startsAt) ?? '');
		const end = Date.parse(toUtcIso(v.endsAt) ?? '');
		if (!Number.isFinite(start) || !Number.isFinite(end)) return;
		if (!(end > start)) {
			ctx.addIssue({
				code: 'custom',
				path: ['endsAt'],
				message: 'The end must be after the start.'
			});
		} else if (end - start > MAX_WINDOW_DAYS * 86_400_000) {
			ctx.addIssue({
				code: 'custom',
				path: ['endsAt'],
				message: `Reserve at most ${MAX_WINDOW_DAYS} days; a longer overhaul is a toolroom job.`
			});
		}
	});
export type ServiceWindowForm = z.infer<typeof serviceWindowFormSchema>;

export const cancelWindowSchema = z.object({
	id: z.coerce.number().int().positive(),
	reason: z
		.string()
		.trim()
		.min(3, 'Say in a few words why the window is cancelled.')
		.max(300, 'Keep the reason under 300 characters.')
});

export const startWindowSchema = z.object({ id: z.coerce.number().int().positive() });

/**
 * The free-slot finder asks the order-check question without a press: die, parts, scrap, rate
 * and the earliest start (`from`, empty for now).
 */
export const freeSlotQuerySchema = orderCheckQuerySchema.omit({ press: true });
export type FreeSlotQuery = z.infer<typeof freeSlotQuerySchema>;

/** How far ahead the finder looks for a slot, days (a booking may not be longer than this). */
export const SLOT_HORIZON_DAYS = MAX_BOOKING_DAYS;
