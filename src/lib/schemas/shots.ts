import { z } from 'zod';
import { decimalNumber, optionalWholeNumber, wholeNumber } from './numbers';

export const SHOT_SOURCES = ['manual', 'csv', 'api', 'correction', 'seed', 'opening'] as const;
export const SHOT_SOURCE_LABELS: Record<(typeof SHOT_SOURCES)[number], string> = {
	manual: 'Press-run form',
	csv: 'CSV upload',
	api: 'API',
	correction: 'Correction',
	seed: 'Imported',
	opening: 'Opening balance'
};

/** `YYYY-MM-DDTHH:MM` as a datetime-local input sends it (read as plant time). */
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

// Read strictly from the text typed (see ./numbers): `3.9`, `12abc` and `2e1` are refused.
const optionalCount = (what: string) =>
	optionalWholeNumber({
		min: [0, `${what} cannot be negative.`],
		max: [2_000_000_000, `${what} is too large.`]
	});

const optionalNote = z
	.string()
	.trim()
	.max(500, 'Keep the note under 500 characters.')
	.optional()
	.default('');

/**
 * Counter readings come in pairs, or a count instead: the one refine the press-run form, the
 * entry correction and the API share (each with its own words).
 */
function refineCounterPair(
	v: { counterStart?: number | null; counterEnd?: number | null; shots?: number },
	ctx: z.RefinementCtx,
	words: { pair: string; missing: string | null }
) {
	const hasStart = v.counterStart != null;
	const hasEnd = v.counterEnd != null;
	if (hasStart !== hasEnd) {
		ctx.addIssue({
			code: 'custom',
			path: [hasStart ? 'counterEnd' : 'counterStart'],
			message: words.pair
		});
	} else if (!hasStart && v.shots === undefined && words.missing) {
		ctx.addIssue({ code: 'custom', path: ['shots'], message: words.missing });
	}
}

/** Press-run form: a shot count, or counter readings at start and end of the run. */
export const pressRunSchema = z
	.object({
		die: dieNumber,
		machine: z.string().trim().min(1, 'Choose the press.').max(40),
		countedAt: z
			.string()
			.trim()
			.regex(DATETIME_LOCAL, 'Enter the date and time of the count (plant time).'),
		shots: optionalCount('Shots'),
		counterStart: optionalCount('The counter start'),
		counterEnd: optionalCount('The counter end'),
		note: optionalNote,
		/** Why the counter went back (a press controller swap); allows a smaller counter start. */
		resetReason: optionalNote,
		/** A person's reason to count an entry the plausibility checks question. */
		confirmReason: optionalNote
	})
	.superRefine((v, ctx) =>
		refineCounterPair(v, ctx, {
			pair: 'Give both counter readings, or leave both empty and enter the shots.',
			missing: 'Enter the shots, or the counter start and end.'
		})
	);
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
	shots: wholeNumber({
		required: 'Enter the correction in shots (negative to take shots off).'
	}).refine((n) => n !== 0, 'A correction must change the count (not 0).'),
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

/**
 * The toolroom lead's change to one ledger entry: confirm it (it was flagged "to review"),
 * correct its figures, or void it. Always with a reason.
 */
export const entryChangeSchema = z
	.object({
		entry: z
			.number({ error: 'Choose the entry.' })
			.int('Choose the entry.')
			.positive('Choose the entry.'),
		action: z.enum(['confirm', 'correct', 'void'], { error: 'Choose what to do with the entry.' }),
		shots: optionalCount('Shots'),
		counterStart: optionalCount('The counter start'),
		counterEnd: optionalCount('The counter end'),
		countedAt: z
			.string()
			.trim()
			.refine(
				(s) => s === '' || DATETIME_LOCAL.test(s),
				'Enter a date and time, or leave it empty.'
			)
			.optional()
			.default(''),
		reason: z
			.string({ error: 'Give the reason.' })
			.trim()
			.min(5, 'Give the reason (at least 5 characters).')
			.max(500, 'Keep the reason under 500 characters.')
	})
	.superRefine((v, ctx) => {
		if (v.action !== 'correct') return;
		refineCounterPair(v, ctx, {
			pair: 'Give both counter readings, or neither.',
			missing: v.countedAt === '' ? 'Enter the corrected shots, counter readings or time.' : null
		});
	});
export type EntryChangeForm = z.infer<typeof entryChangeSchema>;

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
	hardnessHrc: decimalNumber({
		required: 'Enter the hardness in HRC.',
		min: [20, 'Below 20 HRC is not a hardened die steel.'],
		max: [70, 'Above 70 HRC is not plausible for a die steel.']
	}),
	reason: z
		.string({ error: 'Give the reason for the replacement.' })
		.trim()
		.min(5, 'Give the reason for the replacement (at least 5 characters).')
		.max(500, 'Keep the reason under 500 characters.')
});

const apiCount = (name: string) =>
	z
		.number({ error: `${name} must be a number.` })
		.int(`${name} must be a whole number.`)
		.min(0, `${name} must be 0 or more.`)
		.max(Number.MAX_SAFE_INTEGER, `${name} is too large.`)
		.nullish();
const apiPress = (name: string) =>
	z
		.string({ error: `${name} must be a press name.` })
		.trim()
		.max(40, `${name} has at most 40 characters.`)
		.nullish();

/**
 * One entry of `POST /api/v1/shots` (DESIGN.md "Interfaces"): `shots`, or `counterStart` and
 * `counterEnd` (then `shots`, if given, must match); `press` names the press (`machine` is its
 * old name, still accepted). Unknown fields are refused.
 */
export const apiShotEntrySchema = z
	.strictObject({
		die: z
			.string({ error: 'die must be a die number, e.g. "D-0147".' })
			.trim()
			.min(1, 'die must not be empty.')
			.max(20, 'die has at most 20 characters.'),
		shots: z
			.number({ error: 'shots must be a number.' })
			.int('shots must be a whole number.')
			.positive('shots must be a positive whole number.')
			.optional(),
		counterStart: apiCount('counterStart'),
		counterEnd: apiCount('counterEnd'),
		countedAt: z
			.string({ error: 'countedAt must be an ISO-8601 date-time string.' })
			.max(40, 'countedAt is too long for a date-time.')
			.optional(),
		press: apiPress('press'),
		machine: apiPress('machine'),
		key: z
			.string({ error: 'key must be a string.' })
			.trim()
			.min(1, 'key must not be empty (leave it out instead).')
			.max(200, 'key has at most 200 characters.')
			.nullish(),
		/** Why the counter went back (a reset or rollover); allows a start below the last reading. */
		resetReason: z
			.string({ error: 'resetReason must be a string.' })
			.trim()
			.max(500, 'resetReason has at most 500 characters.')
			.nullish()
	})
	.superRefine((v, ctx) => {
		refineCounterPair(v, ctx, {
			pair: 'Send both counterStart and counterEnd, or shots alone.',
			missing: 'shots is required (or counterStart and counterEnd).'
		});
		if (v.press && v.machine && v.press.toLowerCase() !== v.machine.toLowerCase()) {
			ctx.addIssue({
				code: 'custom',
				path: ['machine'],
				message: 'press and machine (its old name) name different presses; send press alone.'
			});
		}
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
