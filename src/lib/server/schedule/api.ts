import type { z } from 'zod';
import { ApiError, type ApiIssue } from '../api/respond';
import type { BookingCheck } from './verdict';
import type { CreateBookingResult } from './bookings';

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
