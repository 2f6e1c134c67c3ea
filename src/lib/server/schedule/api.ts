import type { z } from 'zod';
import { ApiError, type ApiIssue } from '../api/respond';
import type { BookingCheck } from './verdict';
import { toUtcIso, type BookingPatchApiInput } from '../../schemas/schedule';
import type { BookingRow, CreateBookingResult, NewBookingInput } from './bookings';

/** Zod issues as the API's row-level `issues`. */
export function issuesOf(error: z.ZodError): ApiIssue[] {
	return error.issues.map((i) => ({ field: i.path.join('.') || 'body', message: i.message }));
}

const asIssues = (checks: BookingCheck[]): ApiIssue[] =>
	checks.map((c) => ({ field: c.code, message: c.message }));

/**
 * The API's answer to a refused booking: 400 for an unknown die or press, 422 when a check blocks
 * it (blocks cannot be overridden), 409 when only warnings stand and `"confirm": true` was not sent.
 */
export function bookingRefusal(result: Exclude<CreateBookingResult, { ok: true }>): ApiError {
	if (result.kind === 'invalid') {
		return new ApiError(400, result.message, [{ field: result.field, message: result.message }]);
	}
	if (result.kind === 'gone') {
		return new ApiError(result.status, result.message);
	}
	if (result.kind === 'review') {
		// The API is never asked to show the run back first; kept so every refusal has an answer.
		return new ApiError(409, 'Read the worked-out run and send the booking again.');
	}
	if (result.kind === 'blocked') {
		const first = result.blocks[0].message;
		const more = result.blocks.length > 1 ? ` (and ${result.blocks.length - 1} more)` : '';
		return new ApiError(422, `The booking is refused: ${first}${more}`, asIssues(result.blocks));
	}
	return new ApiError(
		409,
		'The booking has warnings. Read them and send the same booking with "confirm": true to book anyway.',
		asIssues(result.warnings)
	);
}

/**
 * A PATCH body over the booking as booked: fields left out stay, `"shotsPerHour": null` goes back
 * to the default rate, and the end is worked out again (`"endsAt": null` or empty) unless an end
 * is sent, or the booking's end was set by hand and neither start nor press changes.
 */
export function patchedBookingInput(
	current: BookingRow,
	patch: BookingPatchApiInput,
	raw: Record<string, unknown>
): NewBookingInput {
	const startsAt = patch.startsAt ? toUtcIso(patch.startsAt)! : current.starts_at;
	const press = patch.press ?? current.pressName;
	const moved = startsAt !== current.starts_at || press !== current.pressName;
	let endsAt: string | null = null;
	let endReason: string | null = null;
	if (patch.endsAt) {
		endsAt = toUtcIso(patch.endsAt)!;
		endReason = patch.endReason ?? current.end_reason;
	} else if (!('endsAt' in raw) && current.end_reason && !moved) {
		endsAt = current.ends_at;
		endReason = patch.endReason ?? current.end_reason;
	}
	return {
		die: current.dieNumber,
		press,
		startsAt,
		endsAt,
		endReason,
		orderRef: patch.orderRef ?? current.order_ref,
		parts: patch.parts ?? current.parts,
		scrapPct: patch.scrapPct ?? current.scrap_pct,
		shotsPerHour: raw.shotsPerHour === null ? null : (patch.shotsPerHour ?? current.shots_per_hour),
		notes: patch.notes ?? current.notes
	};
}
