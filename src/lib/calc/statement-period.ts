// Statement periods in plant calendar dates: a month, a quarter, a year or custom dates, each
// turned into its first and last day (both included) and split into calendar months for the
// monthly series. Dates are `YYYY-MM-DD` plant dates; the caller turns them into instants with
// the plant's zone (plant-time.ts).
import { addDaysToDate, calendarFieldsValid } from './dates';

export type PeriodKind = 'month' | 'quarter' | 'year' | 'custom';

export type PeriodSpec =
	| { kind: 'month'; year: number; month: number }
	| { kind: 'quarter'; year: number; quarter: number }
	| { kind: 'year'; year: number }
	| { kind: 'custom'; from: string; to: string };

export interface StatementPeriod {
	kind: PeriodKind;
	/** First plant date of the period. */
	from: string;
	/** Last plant date of the period (included). */
	to: string;
	/** In words, e.g. "March 2026", "Q2 2026 (April–June)". */
	label: string;
}

/** Month names, January first. */
export const MONTH_NAMES = [
	'January',
	'February',
	'March',
	'April',
	'May',
	'June',
	'July',
	'August',
	'September',
	'October',
	'November',
	'December'
];

const pad = (n: number) => String(n).padStart(2, '0');

/** The last day of a month (`YYYY-MM-DD`). */
function monthEnd(year: number, month: number): string {
	const next = month === 12 ? `${year + 1}-01-01` : `${year}-${pad(month + 1)}-01`;
	return addDaysToDate(next, -1);
}

/** "5 March 2026" for a `YYYY-MM-DD` date. */
export function dateInWords(date: string): string {
	const [y, m, d] = date.split('-').map(Number);
	return `${d} ${MONTH_NAMES[m - 1]} ${y}`;
}

/** "March 2026" for a `YYYY-MM` month. */
export function monthInWords(month: string): string {
	const [y, m] = month.split('-').map(Number);
	return `${MONTH_NAMES[m - 1]} ${y}`;
}

/** The first and last day of a period and its name; throws RangeError for an impossible one. */
export function resolvePeriod(spec: PeriodSpec): StatementPeriod {
	switch (spec.kind) {
		case 'month': {
			const { year, month } = spec;
			if (!Number.isInteger(month) || month < 1 || month > 12) {
				throw new RangeError('A month is 1 to 12.');
			}
			return {
				kind: 'month',
				from: `${year}-${pad(month)}-01`,
				to: monthEnd(year, month),
				label: `${MONTH_NAMES[month - 1]} ${year}`
			};
		}
		case 'quarter': {
			const { year, quarter } = spec;
			if (!Number.isInteger(quarter) || quarter < 1 || quarter > 4) {
				throw new RangeError('A quarter is 1 to 4.');
			}
			const first = (quarter - 1) * 3 + 1;
			return {
				kind: 'quarter',
				from: `${year}-${pad(first)}-01`,
				to: monthEnd(year, first + 2),
				label: `Q${quarter} ${year} (${MONTH_NAMES[first - 1]}–${MONTH_NAMES[first + 1]})`
			};
		}
		case 'year':
			return {
				kind: 'year',
				from: `${spec.year}-01-01`,
				to: `${spec.year}-12-31`,
				label: String(spec.year)
			};
		case 'custom': {
			const { from, to } = spec;
			if (!/^\d{4}-\d{2}-\d{2}$/.test(from) || !calendarFieldsValid(from)) {
				throw new RangeError(`"${from}" is not a date.`);
			}
			if (!/^\d{4}-\d{2}-\d{2}$/.test(to) || !calendarFieldsValid(to)) {
				throw new RangeError(`"${to}" is not a date.`);
			}
			if (to < from) throw new RangeError('The last day comes before the first day.');
			return {
				kind: 'custom',
				from,
				to,
				label: `${dateInWords(from)} – ${dateInWords(to)}`
			};
		}
	}
}

export interface PeriodMonth {
	/** `YYYY-MM`. */
	month: string;
	/** The part of the month inside the period: first and last day, both included. */
	from: string;
	to: string;
	/** True when the period covers the whole month. */
	whole: boolean;
}

/** The calendar months a period touches, oldest first, each cut to the period. */
export function monthsOfPeriod(from: string, to: string): PeriodMonth[] {
	const result: PeriodMonth[] = [];
	let year = Number(from.slice(0, 4));
	let month = Number(from.slice(5, 7));
	for (;;) {
		const start = `${year}-${pad(month)}-01`;
		if (start > to) break;
		const end = monthEnd(year, month);
		const cutFrom = start < from ? from : start;
		const cutTo = end > to ? to : end;
		result.push({
			month: `${year}-${pad(month)}`,
			from: cutFrom,
			to: cutTo,
			whole: cutFrom === start && cutTo === end
		});
		month++;
		if (month === 13) {
			month = 1;
			year++;
		}
	}
	return result;
}

/** A statement's reference: `ST-<customer code>-<yyyymmdd>-<seq, two digits or more>`. */
export function statementReference(customerCode: string, issueDay: string, seq: number): string {
	if (!Number.isInteger(seq) || seq < 1) throw new RangeError('A sequence number starts at 1.');
	const code = customerCode.toUpperCase().replace(/[^A-Z0-9]+/g, '');
	return `ST-${code}-${issueDay.replaceAll('-', '')}-${pad(seq)}`;
}

/**
 * What billable toolroom hours cost at an hourly rate, rounded to the cent (half away from zero).
 * Null when either is unknown.
 */
export function repairCost(hours: number | null, ratePerHour: number | null): number | null {
	if (hours === null || ratePerHour === null) return null;
	return Math.round(hours * ratePerHour * 100) / 100;
}
