import { z } from 'zod';

export const SHOT_SOURCES = ['manual', 'csv', 'api', 'correction', 'seed'] as const;
export const SHOT_SOURCE_LABELS: Record<(typeof SHOT_SOURCES)[number], string> = {
	manual: 'Press-run form',
	csv: 'CSV upload',
	api: 'API',
	correction: 'Correction',
	seed: 'Imported'
};

/** `YYYY-MM-DDTHH:MM` as a datetime-local input sends it (read as UTC). */
const DATETIME_LOCAL = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?$/;
const DAY = /^\d{4}-\d{2}-\d{2}$/;
/** Keyset cursor: `<counted_at>_<id>` of the last row shown. */
const CURSOR = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z_\d{1,12}$/;

const dieNumber = z
	.string({ error: 'Enter the die number.' })
	.trim()
	.toUpperCase()
	.min(1, 'Enter the die number.')
	.max(20, 'A die number has at most 20 characters.');

const optionalCount = (what: string) =>
	z
		.number({ error: `${what} must be a whole number.` })
		.int(`${what} must be a whole number.`)
		.min(0, `${what} cannot be negative.`)
		.max(2_000_000_000, `${what} is too large.`)
		.optional();

const optionalNote = z
	.string()
	.trim()
	.max(500, 'Keep the note under 500 characters.')
	.optional()
	.default('');

/** Press-run form: a shot count, or counter readings at start and end of the run. */
export const pressRunSchema = z
	.object({
		die: dieNumber,
		machine: z.string().trim().min(1, 'Choose the press.').max(40),
		countedAt: z
			.string()
			.trim()
			.regex(DATETIME_LOCAL, 'Enter the date and time of the count (UTC).'),
		shots: optionalCount('Shots'),
		counterStart: optionalCount('The counter start'),
		counterEnd: optionalCount('The counter end'),
		note: optionalNote
	})
	.superRefine((v, ctx) => {
		const hasStart = v.counterStart !== undefined;
		const hasEnd = v.counterEnd !== undefined;
		if (hasStart !== hasEnd) {
			ctx.addIssue({
				code: 'custom',
				path: [hasStart ? 'counterEnd' : 'counterStart'],
				message: 'Give both counter readings, or leave both empty and enter the shots.'
			});
		} else if (!hasStart && v.shots === undefined) {
			ctx.addIssue({
				code: 'custom',
				path: ['shots'],
				message: 'Enter the shots, or the counter start and end.'
			});
		}
	});
export type PressRunForm = z.infer<typeof pressRunSchema>;

/** Shots of a press-run form: the count given, or the counter difference. */
export function pressRunShots(v: Pick<PressRunForm, 'shots' | 'counterStart' | 'counterEnd'>) {
	if (v.counterStart !== undefined && v.counterEnd !== undefined) {
		return v.shots ?? v.counterEnd - v.counterStart;
	}
	return v.shots ?? 0;
}

/** A correcting entry: signed, with a mandatory reason. */
export const correctionSchema = z.object({
	// Optional in the schema only so the field starts empty; the refine makes it required.
	shots: z
		.number({ error: 'Enter the correction in shots (negative to take shots off).' })
		.int('Enter whole shots.')
		.optional()
		.refine((n) => n !== undefined, 'Enter the correction in shots (negative to take shots off).')
		.refine((n) => n !== 0, 'A correction must change the count (not 0).'),
	countedAt: z
		.string()
		.trim()
		.refine((s) => s === '' || DATETIME_LOCAL.test(s), 'Enter a date and time, or leave it empty.')
		.optional()
		.default(''),
	reason: z
		.string({ error: 'Give the reason for the correction.' })
		.trim()
		.min(5, 'Give the reason for the correction (at least 5 characters).')
		.max(500, 'Keep the reason under 500 characters.')
});

/** Replacing the cover or ejector half of a die. */
export const halfReplaceSchema = z.object({
	side: z.enum(['cover', 'ejector'], { error: 'Choose the half to replace.' }),
	serial: z
		.string({ error: 'Enter the serial of the new half.' })
		.trim()
		.toUpperCase()
		.regex(/^[A-Z0-9][A-Z0-9./-]{0,39}$/, 'Use up to 40 letters, digits, dots, slashes or dashes.'),
	steel: z
		.string({ error: 'Enter the steel grade.' })
		.trim()
		.min(2, 'Enter the steel grade, e.g. H13.')
		.max(40),
	hardnessHrc: z
		.number({ error: 'Enter the hardness in HRC.' })
		.min(20, 'Below 20 HRC is not a hardened die steel.')
		.max(70, 'Above 70 HRC is not plausible for a die steel.'),
	reason: z
		.string({ error: 'Give the reason for the replacement.' })
		.trim()
		.min(5, 'Give the reason for the replacement (at least 5 characters).')
		.max(500, 'Keep the reason under 500 characters.')
});

/** One entry of `POST /api/v1/shots` (DESIGN.md "Interfaces"); unknown fields are refused. */
export const apiShotEntrySchema = z.strictObject({
	die: z
		.string({ error: 'die must be a die number, e.g. "D-0147".' })
		.trim()
		.min(1, 'die must not be empty.')
		.max(20, 'die has at most 20 characters.'),
	shots: z
		.number({ error: 'shots must be a number.' })
		.int('shots must be a whole number.')
		.positive('shots must be a positive whole number.'),
	countedAt: z
		.string({ error: 'countedAt must be an ISO-8601 date-time string.' })
		.max(40, 'countedAt is too long for a date-time.')
		.optional(),
	machine: z
		.string({ error: 'machine must be a press name.' })
		.trim()
		.max(40, 'machine has at most 40 characters.')
		.nullish(),
	key: z
		.string({ error: 'key must be a string.' })
		.trim()
		.min(1, 'key must not be empty (leave it out instead).')
		.max(200, 'key has at most 200 characters.')
		.nullish(),
	press: z.string().trim().max(40).nullish(),
	counterStart: z.number().int().nonnegative().nullish(),
	counterEnd: z.number().int().nonnegative().nullish(),
	resetReason: z.string().trim().max(500).nullish()
});
export type ApiShotEntry = z.infer<typeof apiShotEntrySchema>;

/** Filters of the shot ledger list, all in the URL. */
export const shotListQuerySchema = z.object({
	q: z.string().trim().toUpperCase().max(20).catch(''),
	source: z.enum([...SHOT_SOURCES, '']).catch(''),
	press: z.string().trim().max(40).catch(''),
	from: z.string().regex(DAY).or(z.literal('')).catch(''),
	to: z.string().regex(DAY).or(z.literal('')).catch(''),
	before: z.string().regex(CURSOR).or(z.literal('')).catch(''),
	after: z.string().regex(CURSOR).or(z.literal('')).catch(''),
	size: z.coerce.number().int().min(10).max(200).catch(50)
});
export type ShotListQuery = z.infer<typeof shotListQuerySchema>;

/** `GET /api/v1/dies/{number}/order-check` parameters. */
export const orderCheckQuerySchema = z.object({
	parts: z.coerce
		.number({ error: 'parts must be a number.' })
		.int('parts must be a whole number.')
		.min(1, 'parts must be at least 1.')
		.max(100_000_000, 'parts above 100 million is not plausible.'),
	scrapPct: z.coerce
		.number({ error: 'scrapPct must be a number.' })
		.min(0, 'scrapPct must be at least 0.')
		.lt(100, 'scrapPct must be below 100.')
		.default(0),
	shotsPerHour: z.coerce
		.number({ error: 'shotsPerHour must be a number.' })
		.gt(0, 'shotsPerHour must be more than 0.')
		.max(18_000, 'shotsPerHour above 18 000 is not plausible for a die-casting press.')
});
