import { z } from 'zod';
import { readPlantDateTime, toPlantInput } from '../plant-time';
import { calendarFieldsValid } from '../calc/dates';
import { MAX_PLAUSIBLE_SHOTS_PER_HOUR } from '../calc/life';
import { decimalNumber, optionalDecimalNumber, optionalWholeNumber, wholeNumber } from './numbers';

// Optional text stays a string ('' when empty) so a form can round-trip it; the server stores
// empty text as null.
const optionalText = (max: number) =>
	z.string().trim().max(max, `Keep it under ${max} characters.`).default('');

// An empty form field means "not given", not zero (./numbers reads blank as undefined).

const optionalPositive = (what: string, max: number) =>
	optionalDecimalNumber({
		gt: [0, `The ${what} must be above 0.`],
		max: [max, `More than ${max} is not plausible for the ${what}.`]
	});

/** Expected scrap when none is given, percent: the same on the order-check page, its API and the booking form. */
export const DEFAULT_SCRAP_PCT = 2;

const scrapPct = optionalDecimalNumber({
	min: [0, 'Scrap cannot be below 0 %.'],
	max: [90, 'Scrap above 90 % is not plausible.']
}).transform((v) => v ?? DEFAULT_SCRAP_PCT);

/** Longest booking Castellan takes; longer runs are booked in parts. Keeps window queries bounded. */
export const MAX_BOOKING_DAYS = 90;

export const FORCE_UNITS = ['kN', 'tf', 'ust'] as const;
export type ForceUnit = (typeof FORCE_UNITS)[number];
export const FORCE_UNIT_LABELS: Record<ForceUnit, string> = {
	kN: 'kN',
	tf: 'tonnes-force',
	ust: 'US tons'
};

/** Press form. Shot weight and tie-bar spacing are entered in the user's unit system. */
export const pressFormSchema = z.object({
	name: z
		.string()
		.trim()
		.toUpperCase()
		.regex(
			/^[A-Z0-9][A-Z0-9 -]{0,19}$/,
			'Use 1–20 capital letters, digits, spaces or dashes, e.g. CC-84.'
		),
	chamber: z.enum(['hot', 'cold'], { error: 'Choose hot or cold chamber.' }),
	clampForce: decimalNumber({
		required: 'Enter the clamping force.',
		gt: [0, 'The clamping force must be above 0.'],
		max: [200_000, 'More than 200 000 is not plausible for a die-casting press.']
	}),
	clampUnit: z.enum(FORCE_UNITS).default('kN'),
	maxShotWeight: optionalPositive('maximum shot weight', 500),
	tieBarSpacing: optionalPositive('tie-bar spacing', 5000),
	status: z
		.enum(['available', 'down'], { error: 'Choose available or down.' })
		.default('available'),
	/** Minutes; empty means the plant default (common practice, see DEFAULT_CHANGEOVER). */
	dieChangeMinutes: optionalWholeNumber({
		min: [0, 'The die change cannot take less than 0 minutes.'],
		max: [1440, 'More than 24 hours (1440 min) is not plausible for a die change.']
	}).transform((v) => v ?? DEFAULT_CHANGEOVER.dieChangeMinutes),
	preheatMinutes: optionalWholeNumber({
		min: [0, 'Preheat cannot take less than 0 minutes.'],
		max: [1440, 'More than 24 hours (1440 min) is not plausible for preheat.']
	}).transform((v) => v ?? DEFAULT_CHANGEOVER.preheatMinutes),
	shotsPerHour: optionalPositive('usual shots per hour', MAX_PLAUSIBLE_SHOTS_PER_HOUR),
	notes: optionalText(1000)
});
export type PressForm = z.infer<typeof pressFormSchema>;

/**
 * Die change and preheat before a run when the press has none of its own, minutes: 90 min to
 * change a die and 60 min to bring it to temperature (common practice for a mid-size press; the
 * same values the migration gave existing presses).
 */
export const DEFAULT_CHANGEOVER = { dieChangeMinutes: 90, preheatMinutes: 60 } as const;

const DATE_TIME =
	/^(\d{4}-\d{2}-\d{2})[T ](\d{2}:\d{2}(?::\d{2}(?:\.\d{1,3})?)?)(Z|[+-]\d{2}:\d{2})?$/;

/**
 * A date and time as a `datetime-local` field sends it (read as plant time) or a full ISO-8601
 * timestamp with Z or an offset, as ISO UTC text; null when it is not one.
 */
export function toUtcIso(value: string): string | null {
	const text = value.trim();
	if (!DATE_TIME.test(text)) return null;
	// The ledger's calendar check: 2027-02-30 is refused, not read as 2 March.
	if (!calendarFieldsValid(text.replace(' ', 'T').slice(0, 16))) return null;
	return readPlantDateTime(text);
}

/** The `datetime-local` value (YYYY-MM-DDTHH:mm, plant clock) of an ISO instant. */
export function toLocalInput(iso: string): string {
	return toPlantInput(iso);
}

/** Kept as typed so a form can show it again; read with `toUtcIso` after validation. */
export const dateTimeField = (what: string) =>
	z
		.string({ error: `Enter the ${what}.` })
		.trim()
		.min(1, `Enter the ${what}.`)
		.refine(
			(v) => toUtcIso(v) !== null,
			`Give the ${what} as date and time, e.g. 2026-12-14T06:00.`
		);

/** Like dateTimeField, but empty means "not given". */
const optionalDateTimeField = (what: string) =>
	z
		.string()
		.trim()
		.default('')
		.refine(
			(v) => v === '' || toUtcIso(v) !== null,
			`Give the ${what} as date and time, e.g. 2026-12-14T06:00, or leave it empty.`
		);

const bookingFields = {
	die: z
		.string({ error: 'Enter the die number.' })
		.trim()
		.toUpperCase()
		.min(1, 'Enter the die number, e.g. D-0107.')
		.max(20, 'A die number has at most 20 characters.'),
	press: z.string({ error: 'Choose the press.' }).trim().min(1, 'Choose the press.').max(20),
	startsAt: dateTimeField('start'),
	/** Empty: worked out from the run (die change + preheat + press hours). */
	endsAt: optionalDateTimeField('end'),
	/** Why the end differs from the worked-out one; required then (the server knows the end). */
	endReason: optionalText(300),
	orderRef: z
		.string({ error: 'Enter the order reference.' })
		.trim()
		.min(1, 'Enter the order reference.')
		.max(40, 'Keep the order reference under 40 characters.'),
	parts: wholeNumber({
		required: 'Enter the number of parts.',
		min: [1, 'Book at least 1 part.'],
		max: [50_000_000, 'More than 50 million parts is not plausible for one booking.']
	}),
	scrapPct,
	shotsPerHour: optionalPositive('planned shots per hour', MAX_PLAUSIBLE_SHOTS_PER_HOUR),
	notes: optionalText(1000)
};

/** A booking starts at most this many days back (late entry of a past run)… */
export const BOOKING_PAST_DAYS = 366;
/** …and at most this many days ahead (a plan, not a typo such as 9999-12-31). */
export const BOOKING_FUTURE_DAYS = 3 * 366;

function checkWindow(v: { startsAt: string; endsAt: string }, ctx: z.RefinementCtx) {
	const start = Date.parse(toUtcIso(v.startsAt) ?? '');
	// A bad date already has its own message; an empty end is worked out (and checked) later.
	if (!Number.isFinite(start)) return;
	const now = Date.now();
	if (
		start < now - BOOKING_PAST_DAYS * 86_400_000 ||
		start > now + BOOKING_FUTURE_DAYS * 86_400_000
	) {
		ctx.addIssue({
			code: 'custom',
			path: ['startsAt'],
			message: 'The start must lie within a year back and three years ahead.'
		});
		return;
	}
	if (v.endsAt === '') return;
	const end = Date.parse(toUtcIso(v.endsAt) ?? '');
	if (!Number.isFinite(end)) return;
	if (!(end > start)) {
		ctx.addIssue({ code: 'custom', path: ['endsAt'], message: 'The end must be after the start.' });
	} else if (end - start > MAX_BOOKING_DAYS * 86_400_000) {
		ctx.addIssue({
			code: 'custom',
			path: ['endsAt'],
			message: `Book at most ${MAX_BOOKING_DAYS} days at a time; split a longer run into several bookings.`
		});
	}
}

/**
 * The booking form. `confirm` is the "book anyway" box; `confirmedWarnings` carries the codes of
 * the warnings the planner saw, so a changed booking with new warnings is asked about again.
 */
export const bookingFormSchema = z
	.object({
		...bookingFields,
		confirm: z.boolean().default(false),
		confirmedWarnings: z.string().max(400).default(''),
		/** The end the planner was shown (datetime-local, plant time); empty before the first look. */
		shownEndsAt: z.string().trim().max(40).default('')
	})
	.superRefine(checkWindow);
export type BookingForm = z.infer<typeof bookingFormSchema>;

/**
 * `POST /api/v1/bookings`: warnings are accepted only with `"confirm": true`. Times with Z or an
 * offset, or plant time without one. Without `endsAt` the end is worked out; an `endsAt` other
 * than the worked-out one needs `endReason`.
 */
export const bookingApiSchema = z
	.object({ ...bookingFields, confirm: z.boolean().default(false) })
	.superRefine(checkWindow)
	.transform((v) => ({
		...v,
		startsAt: toUtcIso(v.startsAt)!,
		endsAt: v.endsAt ? toUtcIso(v.endsAt)! : null
	}));
export type BookingApiInput = z.infer<typeof bookingApiSchema>;

/**
 * `PATCH /api/v1/bookings/{id}`: the fields to change; the rest stay as booked. `"endsAt": null`
 * works the end out again; left out, the end is worked out again too unless the booking's end was
 * set by hand and the start stays.
 */
export const bookingPatchApiSchema = z
	.object({
		press: bookingFields.press.optional(),
		startsAt: dateTimeField('start').optional(),
		endsAt: z
			.string()
			.trim()
			.nullish()
			.refine(
				(v) => v == null || v === '' || toUtcIso(v) !== null,
				'Give the end as date and time, e.g. 2026-12-14T06:00, or null to work it out.'
			),
		endReason: optionalText(300).optional(),
		orderRef: bookingFields.orderRef.optional(),
		parts: bookingFields.parts.optional(),
		scrapPct: optionalDecimalNumber({
			min: [0, 'Scrap cannot be below 0 %.'],
			max: [90, 'Scrap above 90 % is not plausible.']
		}),
		// Null or left out reads as undefined here; the route tells "null" (back to the default
		// rate) from "left out" (keep the booked rate) by the body itself.
		shotsPerHour: bookingFields.shotsPerHour,
		notes: optionalText(1000).optional(),
		confirm: z.boolean().default(false)
	})
	.strict();
export type BookingPatchApiInput = z.infer<typeof bookingPatchApiSchema>;

export const cancelBookingSchema = z.object({
	reason: z
		.string()
		.trim()
		.min(3, 'Say in a few words why the booking is cancelled.')
		.max(300, 'Keep the reason under 300 characters.')
});

const isoDay = z
	.string()
	.trim()
	.regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-12-14.')
	.refine((v) => Number.isFinite(Date.parse(v)), 'Not a real date.');

/** `GET /api/v1/bookings?from&to` — whole plant days, at most a year and a bit. */
export const bookingWindowQuerySchema = z
	.object({
		from: isoDay,
		to: isoDay,
		die: z.string().trim().toUpperCase().max(20).optional(),
		press: z.string().trim().max(20).optional(),
		cancelled: z.enum(['0', '1']).default('0')
	})
	.superRefine((v, ctx) => {
		const days = (Date.parse(v.to) - Date.parse(v.from)) / 86_400_000;
		if (!(days >= 0))
			ctx.addIssue({ code: 'custom', path: ['to'], message: 'to must not be before from.' });
		else if (days > 400)
			ctx.addIssue({
				code: 'custom',
				path: ['to'],
				message: 'Ask for at most 400 days at a time.'
			});
	});

export const BOARD_SPANS = [14, 28, 56] as const;
export type BoardSpan = (typeof BOARD_SPANS)[number];

/** Board filters as they sit in the URL; anything odd falls back to the default. */
export const boardQuerySchema = z.object({
	from: isoDay.optional().catch(undefined),
	days: z.coerce
		.number()
		.refine((d): d is BoardSpan => (BOARD_SPANS as readonly number[]).includes(d))
		.catch(28),
	owner: z.string().trim().max(20).catch(''),
	family: z.enum(['zinc', 'magnesium', 'aluminium', 'copper', '']).catch(''),
	press: z.string().trim().max(20).catch('')
});
export type BoardQuery = z.infer<typeof boardQuerySchema>;

/** The order check form (a GET form: the question stays in the URL). */
export const orderCheckQuerySchema = z.object({
	die: z.string().trim().toUpperCase().max(20).default(''),
	parts: wholeNumber({
		required: 'Enter the number of parts.',
		min: [1, 'Check at least 1 part.'],
		max: [50_000_000, 'More than 50 million parts is not plausible.']
	}),
	scrapPct,
	press: z.string().trim().max(20).default(''),
	shotsPerHour: optionalPositive('shots per hour', MAX_PLAUSIBLE_SHOTS_PER_HOUR),
	/** Start of the run; empty means now. */
	from: z
		.string()
		.trim()
		.default('')
		.refine(
			(v) => v === '' || toUtcIso(v) !== null,
			'Give the start as date and time, e.g. 2026-12-14T06:00, or leave it empty for now.'
		)
});
export type OrderCheckQuery = z.infer<typeof orderCheckQuerySchema>;

/** `GET /api/v1/dies/{number}/order-check`: the page's question, the die coming from the path. */
export const orderCheckApiQuerySchema = orderCheckQuerySchema.omit({ die: true });
