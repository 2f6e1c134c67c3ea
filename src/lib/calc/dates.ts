// Date helpers shared by the calc modules. Everything is UTC, as the ledger stores it.

const DAY_MS = 86_400_000;
const DATE_ONLY = /^\d{4}-\d{2}-\d{2}$/;

/** Milliseconds in one day. */
export const MS_PER_DAY = DAY_MS;

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/**
 * True when the date at the start of `text` (`YYYY-MM-DD`, optionally followed by `THH…`) is a
 * real calendar day and the hour is at most 23. Date.parse rolls 30 February into March and
 * 24:00 into the next day; this refuses both. Gregorian leap years (divisible by 4, except
 * centuries not divisible by 400).
 */
export function calendarFieldsValid(text: string): boolean {
	const year = Number(text.slice(0, 4));
	const month = Number(text.slice(5, 7));
	const day = Number(text.slice(8, 10));
	if (!Number.isInteger(year) || month < 1 || month > 12 || day < 1) return false;
	const leap = month === 2 && year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
	if (day > MONTH_DAYS[month - 1] + (leap ? 1 : 0)) return false;
	return text.length < 13 || Number(text.slice(11, 13)) <= 23;
}

/**
 * Parse an ISO-8601 date or timestamp to epoch milliseconds (UTC).
 * A date-only string (`YYYY-MM-DD`) stands for the end of that day, i.e. the next midnight UTC,
 * so that "as of 2024-04-30" includes the shots counted on the 30th.
 */
export function parseInstant(value: string): number {
	const ms = Date.parse(value);
	if (!Number.isFinite(ms)) throw new RangeError(`Not a valid date: "${value}".`);
	return DATE_ONLY.test(value) ? ms + DAY_MS : ms;
}

/** The UTC calendar date (`YYYY-MM-DD`) of an ISO-8601 date or timestamp. */
export function isoDateOf(value: string): string {
	if (DATE_ONLY.test(value)) {
		parseInstant(value);
		return value;
	}
	return new Date(parseInstant(value)).toISOString().slice(0, 10);
}

/** The UTC calendar date `days` whole days after the calendar date of `value` (`YYYY-MM-DD`). */
export function addDaysToDate(value: string, days: number): string {
	if (!Number.isInteger(days)) throw new RangeError('Days to add must be a whole number.');
	const start = Date.parse(isoDateOf(value));
	return new Date(start + days * DAY_MS).toISOString().slice(0, 10);
}

/** Latest date a projection reports; beyond it the answer is "not in any useful future". */
const LAST_PROJECTED_MS = Date.parse('9999-12-31');

/**
 * Like `addDaysToDate` for projections: rounds `days` up to whole days and returns null when the
 * date would fall after 9999-12-31 (a trickle of shots against a long interval).
 */
export function projectDate(value: string, days: number): string | null {
	const whole = Math.ceil(days);
	if (!Number.isFinite(whole)) return null;
	const start = Date.parse(isoDateOf(value));
	if (start + whole * DAY_MS > LAST_PROJECTED_MS) return null;
	return addDaysToDate(value, Math.max(0, whole));
}
