import type { UnitSystem } from '../../calc/units';
import { parseTypedNumber } from '../../parse-number';
import { plantDate } from '../../plant-time';
import {
	DEFAULT_SCRAP_PCT,
	toLocalInput,
	toUtcIso,
	type BookingForm
} from '../../schemas/schedule';
import type { DB } from '../db/connect';
import { nowIso } from '../time';
import type { BookingCheck } from './verdict';
import {
	createBooking,
	updateBooking,
	type BookingActor,
	type BookingField,
	type BookingPlan,
	type SaveBookingResult
} from './booking-save';
import type { BookingRow } from './bookings';

const HOUR_MS = 3_600_000;

/** What the booking form shows after a try that saved nothing. */
export interface BookingMessage {
	/** review: the worked-out end and verdict, to be read before saving. */
	kind: 'review' | 'blocked' | 'confirm' | 'gone';
	text: string;
	blocks: BookingCheck[];
	warnings: BookingCheck[];
	plan: BookingPlan | null;
}

/** A number from the URL, read strictly; anything else leaves the field empty. */
function urlNumber(params: URLSearchParams, name: string, kind: 'whole' | 'decimal') {
	const raw = params.get(name);
	if (raw === null) return undefined;
	const parsed = parseTypedNumber(raw, kind);
	return parsed.ok && !parsed.blank ? parsed.value : undefined;
}

/**
 * Starting values of the booking form from the URL. The board and the die page link here with
 * `die`, `press` and `start` (a date, or date and time, plant time); the order check's "Book this"
 * adds `parts`, `scrapPct` and `shotsPerHour`. By default the run starts tomorrow (at the plant)
 * at 06:00 plant time; the end is worked out, so it starts empty.
 */
export function bookingFormDefaults(params: URLSearchParams, now = nowIso()): Partial<BookingForm> {
	const startParam = params.get('start') ?? '';
	const start =
		(/^\d{4}-\d{2}-\d{2}$/.test(startParam)
			? toUtcIso(`${startParam}T06:00`)
			: toUtcIso(startParam)) ?? toUtcIso(`${plantDate(Date.parse(now) + 24 * HOUR_MS)}T06:00`)!;
	const end = toUtcIso(params.get('end') ?? '');
	const parts = urlNumber(params, 'parts', 'whole');
	const scrap = urlNumber(params, 'scrapPct', 'decimal');
	const rate = urlNumber(params, 'shotsPerHour', 'decimal');
	return {
		die: (params.get('die') ?? '').toUpperCase().slice(0, 20),
		press: (params.get('press') ?? '').slice(0, 20),
		startsAt: toLocalInput(start),
		endsAt: end ? toLocalInput(end) : '',
		orderRef: (params.get('order') ?? '').slice(0, 40),
		...(parts !== undefined && parts >= 1 ? { parts } : {}),
		scrapPct: scrap !== undefined && scrap >= 0 && scrap <= 90 ? scrap : DEFAULT_SCRAP_PCT,
		...(rate !== undefined && rate > 0 ? { shotsPerHour: rate } : {}),
		confirm: false,
		confirmedWarnings: '',
		shownEndsAt: ''
	};
}

/** The edit form of a booking: the end is given only when it was set by hand. */
export function bookingToForm(b: BookingRow): Partial<BookingForm> {
	return {
		die: b.dieNumber,
		press: b.pressName,
		startsAt: toLocalInput(b.starts_at),
		endsAt: b.end_reason ? toLocalInput(b.ends_at) : '',
		endReason: b.end_reason ?? '',
		orderRef: b.order_ref,
		parts: b.parts,
		scrapPct: b.scrap_pct,
		shotsPerHour: b.shots_per_hour,
		notes: b.notes ?? '',
		confirm: false,
		confirmedWarnings: '',
		shownEndsAt: ''
	};
}

export type SubmitOutcome =
	| { ok: true; id: number; changed: string[] }
	| { ok: false; field: BookingField; message: string }
	| {
			ok: false;
			field: null;
			message: BookingMessage;
			status: 200 | 404 | 409 | 422;
			confirmedWarnings: string;
			shownEndsAt: string;
	  };

function outcomeOf(result: SaveBookingResult): SubmitOutcome {
	if (result.ok) return { ok: true, id: result.id, changed: result.changed };
	if (result.kind === 'invalid') return { ok: false, field: result.field, message: result.message };
	if (result.kind === 'gone') {
		return {
			ok: false,
			field: null,
			status: result.status,
			confirmedWarnings: '',
			shownEndsAt: '',
			message: { kind: 'gone', text: result.message, blocks: [], warnings: [], plan: null }
		};
	}
	const plan = result.plan;
	const shownEndsAt = toLocalInput(plan.endsAt);
	if (result.kind === 'review') {
		// Warnings come with the run, so the planner can accept them on the next send.
		return {
			ok: false,
			field: null,
			status: 200,
			confirmedWarnings: plan.warnings.map((w) => w.code).join(','),
			shownEndsAt,
			message: {
				kind: 'review',
				text: plan.warnings.length
					? 'Read the worked-out run and the warnings below. Tick the box to save regardless.'
					: 'Read the worked-out run below, then save.',
				blocks: plan.blocks,
				warnings: plan.warnings,
				plan
			}
		};
	}
	if (result.kind === 'blocked') {
		return {
			ok: false,
			field: null,
			status: 422,
			confirmedWarnings: '',
			shownEndsAt,
			message: {
				kind: 'blocked',
				text: `This booking cannot be made: ${result.blocks.length === 1 ? 'one check blocks it' : `${result.blocks.length} checks block it`}.`,
				blocks: result.blocks,
				warnings: result.warnings,
				plan
			}
		};
	}
	return {
		ok: false,
		field: null,
		status: 409,
		confirmedWarnings: result.warnings.map((w) => w.code).join(','),
		shownEndsAt,
		message: {
			kind: 'confirm',
			text: 'Read the warnings below. Tick "Book anyway" and send again to book regardless.',
			blocks: [],
			warnings: result.warnings,
			plan
		}
	};
}

/**
 * Runs a submitted booking form (new, or an edit of booking `id`) through the one booking path;
 * the route turns the outcome into a page. Nothing is saved until the planner has been shown the
 * worked-out end of exactly this booking.
 */
export async function submitBookingForm(
	db: DB,
	data: BookingForm,
	actor: BookingActor,
	unitSystem: UnitSystem,
	id?: number
): Promise<SubmitOutcome> {
	const accepted = data.confirm ? data.confirmedWarnings.split(',').filter(Boolean) : false;
	const input = {
		die: data.die,
		press: data.press,
		startsAt: toUtcIso(data.startsAt)!,
		endsAt: data.endsAt ? toUtcIso(data.endsAt)! : null,
		endReason: data.endReason || null,
		orderRef: data.orderRef,
		parts: data.parts,
		scrapPct: data.scrapPct,
		shotsPerHour: data.shotsPerHour ?? null,
		notes: data.notes || null
	};
	const options = {
		confirm: accepted,
		unitSystem,
		shownEndsAt: data.shownEndsAt ? toUtcIso(data.shownEndsAt) : null
	};
	const result =
		id === undefined
			? await createBooking(db, input, actor, options)
			: await updateBooking(db, id, input, actor, options);
	return outcomeOf(result);
}
