import type { UnitSystem } from '../../calc/units';
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
import { createBooking, type BookingActor } from './bookings';

const HOUR_MS = 3_600_000;

/** What the booking form shows after a refused try. */
export interface BookingMessage {
	kind: 'blocked' | 'confirm';
	text: string;
	blocks: BookingCheck[];
	warnings: BookingCheck[];
}

/**
 * Starting values of the booking form from the URL (the board and the die page link here with
 * `die`, `press` and `start` as a date or date and time, plant time): by default tomorrow (at
 * the plant) from 06:00 plant time for two shifts.
 */
export function bookingFormDefaults(params: URLSearchParams, now = nowIso()): Partial<BookingForm> {
	const startParam = params.get('start') ?? '';
	const start =
		(/^\d{4}-\d{2}-\d{2}$/.test(startParam)
			? toUtcIso(`${startParam}T06:00`)
			: toUtcIso(startParam)) ?? toUtcIso(`${plantDate(Date.parse(now) + 24 * HOUR_MS)}T06:00`)!;
	const end =
		toUtcIso(params.get('end') ?? '') ?? new Date(Date.parse(start) + 16 * HOUR_MS).toISOString();
	return {
		die: (params.get('die') ?? '').toUpperCase().slice(0, 20),
		press: (params.get('press') ?? '').slice(0, 20),
		startsAt: toLocalInput(start),
		endsAt: toLocalInput(end),
		scrapPct: DEFAULT_SCRAP_PCT,
		confirm: false,
		confirmedWarnings: ''
	};
}

export type SubmitOutcome =
	| { ok: true; id: number }
	| { ok: false; field: 'die' | 'press'; message: string }
	| {
			ok: false;
			field: null;
			message: BookingMessage;
			status: 409 | 422;
			confirmedWarnings: string;
	  };

/** Runs a submitted booking form through the checks; the route turns the outcome into a page. */
export async function submitBookingForm(
	db: DB,
	data: BookingForm,
	actor: BookingActor,
	unitSystem: UnitSystem
): Promise<SubmitOutcome> {
	const accepted = data.confirm ? data.confirmedWarnings.split(',').filter(Boolean) : false;
	const result = await createBooking(
		db,
		{ ...data, startsAt: toUtcIso(data.startsAt)!, endsAt: toUtcIso(data.endsAt)! },
		actor,
		{ confirm: accepted, unitSystem }
	);
	if (result.ok) return { ok: true, id: result.id };
	if (result.kind === 'invalid') return { ok: false, field: result.field, message: result.message };
	if (result.kind === 'blocked') {
		return {
			ok: false,
			field: null,
			status: 422,
			confirmedWarnings: '',
			message: {
				kind: 'blocked',
				text: `This booking cannot be made: ${result.blocks.length === 1 ? 'one check blocks it' : `${result.blocks.length} checks block it`}.`,
				blocks: result.blocks,
				warnings: result.warnings
			}
		};
	}
	return {
		ok: false,
		field: null,
		status: 409,
		confirmedWarnings: result.warnings.map((w) => w.code).join(','),
		message: {
			kind: 'confirm',
			text: 'Read the warnings below. Tick "Book anyway" and send again to book regardless.',
			blocks: [],
			warnings: result.warnings
		}
	};
}
