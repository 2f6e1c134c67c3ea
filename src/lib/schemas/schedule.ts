import { z } from 'zod';
import { calendarFieldsValid } from '../calc/dates';
import { MAX_PLAUSIBLE_SHOTS_PER_HOUR } from '../calc/life';

// Optional text stays a string ('' when empty) so a form can round-trip it; the server stores
// empty text as null.
const optionalText = (max: number) =>
	z.string().trim().max(max, `Keep it under ${max} characters.`).default('');

/** An empty form field means "not given", not zero. */
const blankToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);

const optionalPositive = (what: string, max: number) =>
	z.preprocess(
		blankToUndefined,
		z.coerce
			.number({ error: `Enter the ${what} as a number.` })
			.gt(0, `The ${what} must be above 0.`)
			.max(max, `More than ${max} is not plausible for the ${what}.`)
			.optional()
	);

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
	clampForce: z.coerce
		.number({ error: 'Enter the clamping force.' })
		.gt(0, 'The clamping force must be above 0.')
		.max(200_000, 'More than 200 000 is not plausible for a die-casting press.'),
	clampUnit: z.enum(FORCE_UNITS).default('kN'),
	maxShotWeight: optionalPositive('maximum shot weight', 500),
	tieBarSpacing: optionalPositive('tie-bar spacing', 5000),
	status: z
		.enum(['available', 'down'], { error: 'Choose available or down.' })
		.default('available'),
	notes: optionalText(1000)
});
export type PressForm = z.infer<typeof pressFormSchema>;

const DATE_TIME =
	/^(\d{4}-\d{2}-\d{2})[T ](\d{2}:\d{2}(?::\d{2}(?:\.\d{1,3})?)?)(Z|[+-]\d{2}:\d{2})?$/;

/**
 * A date and time as a `datetime-local` field sends it (read as UTC, the zone Castellan shows) or
 * a full ISO-8601 timestamp with Z or an offset, as ISO UTC text; null when it is not one.
 */
export function toUtcIso(value: string): string | null {
	const m = DATE_TIME.exec(value.trim());
	// The ledger's calendar check: 2027-02-30 is refused, not read as 2 March.
	if (m && !calendarFieldsValid(`${m[1]}T${m[2]}`)) return null;
	const ms = m ? Date.parse(`${m[1]}T${m[2]}${m[3] ?? 'Z'}`) : Number.NaN;
	return Number.isFinite(ms) ? new Date(ms).toISOString() : null;
}

/** The `datetime-local` value (YYYY-MM-DDTHH:mm, UTC) of an ISO instant. */
export function toLocalInput(iso: string): string {
	return iso.slice(0, 16);
}

/** Kept as typed so a form can show it again; read with `toUtcIso` after validation. */
const dateTimeField = (what: string) =>
	z
		.string({ error: `Enter the ${what}.` })
		.trim()
		.min(1, `Enter the ${what}.`)
		.refine(
			(v) => toUtcIso(v) !== null,
			`Give the ${what} as date and time, e.g. 2026-12-14T06:00.`
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
	endsAt: dateTimeField('end'),
	orderRef: z
		.string({ error: 'Enter the order reference.' })
		.trim()
		.min(1, 'Enter the order reference.')
		.max(40, 'Keep the order reference under 40 characters.'),
	parts: z.coerce
		.number({ error: 'Enter the number of parts.' })
		.int('Parts must be a whole number.')
		.min(1, 'Book at least 1 part.')
		.max(50_000_000, 'More than 50 million parts is not plausible for one booking.'),
	scrapPct: z.preprocess(
		blankToUndefined,
		z.coerce
			.number({ error: 'Enter scrap as a percentage.' })
			.min(0, 'Scrap cannot be below 0 %.')
			.max(90, 'Scrap above 90 % is not plausible.')
			.default(0)
	),
	shotsPerHour: optionalPositive('planned shots per hour', MAX_PLAUSIBLE_SHOTS_PER_HOUR),
	notes: optionalText(1000)
};

/** A booking starts at most this many days back (late entry of a past run)… */
export const BOOKING_PAST_DAYS = 366;
/** …and at most this many days ahead (a plan, not a typo such as 9999-12-31). */
export const BOOKING_FUTURE_DAYS = 3 * 366;

function checkWindow(v: { startsAt: string; endsAt: string }, ctx: z.RefinementCtx) {
	const start = Date.parse(toUtcIso(v.startsAt) ?? '');
	const end = Date.parse(toUtcIso(v.endsAt) ?? '');
	// A bad date already has its own message.
	if (!Number.isFinite(start) || !Number.isFinite(end)) return;
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
		confirmedWarnings: z.string().max(400).default('')
	})
	.superRefine(checkWindow);
export type BookingForm = z.infer<typeof bookingFormSchema>;

/** `POST /api/v1/bookings`: warnings are accepted only with `"confirm": true`. Times as ISO UTC. */
export const bookingApiSchema = z
	.object({ ...bookingFields, confirm: z.boolean().default(false) })
	.superRefine(checkWindow)
	.transform((v) => ({ ...v, startsAt: toUtcIso(v.startsAt)!, endsAt: toUtcIso(v.endsAt)! }));
export type BookingApiInput = z.infer<typeof bookingApiSchema>;

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

/** `GET /api/v1/bookings?from&to` — whole days, UTC, at most a year and a bit. */
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
	parts: z.coerce
		.number({ error: 'Enter the number of parts.' })
		.int('Parts must be a whole number.')
		.min(1, 'Check at least 1 part.')
		.max(50_000_000, 'More than 50 million parts is not plausible.'),
	scrapPct: z.preprocess(
		blankToUndefined,
		z.coerce
			.number({ error: 'Enter scrap as a percentage.' })
			.min(0, 'Scrap cannot be below 0 %.')
			.max(90, 'Scrap above 90 % is not plausible.')
			.default(0)
	),
	press: z.string().trim().max(20).default(''),
	shotsPerHour: optionalPositive('shots per hour', MAX_PLAUSIBLE_SHOTS_PER_HOUR)
});
export type OrderCheckQuery = z.infer<typeof orderCheckQuerySchema>;
