// Cell readers of the die-register import. Strict: a value that could be read two ways is refused
// with a message naming the form to use; nothing is reinterpreted silently.

/** A cell as the file readers hand it over: text, a real number cell, a real date cell, or blank. */
export type Cell = string | number | Date | null;

export type Read<T> = { ok: true; value: T } | { ok: false; message: string };

const PLAIN = /^-?\d+(\.\d+)?$/;

/**
 * THE number reader of the import (one place, so the plant-wide strict number parser can replace
 * it in one line). Takes a number cell as it is; text only as digits with an optional point.
 */
export function readImportNumber(cell: Cell, whole: boolean): Read<number> {
	let value: number;
	if (typeof cell === 'number') {
		value = cell;
	} else {
		const text = String(cell ?? '').trim();
		if (/^-?\d+,\d+$/.test(text)) {
			return {
				ok: false,
				message: `"${text}" has a comma: write ${text.replace(',', '.')} with a point for decimals, or ${text.replace(',', '')} if the comma separates thousands.`
			};
		}
		if (/^-?\d{1,3}([,. ']\d{3})+$/.test(text)) {
			return {
				ok: false,
				message: `"${text}" has thousands separators: write ${text.replace(/[,. ']/g, '')}.`
			};
		}
		if (/^-?[\d.]+\s*[a-zA-Z²³%]+/.test(text)) {
			return { ok: false, message: `"${text}" has a unit in the cell: write the number alone.` };
		}
		if (!PLAIN.test(text)) return { ok: false, message: `"${text}" is not a number.` };
		value = Number(text);
	}
	if (!Number.isFinite(value)) return { ok: false, message: 'Not a number.' };
	if (whole && !Number.isSafeInteger(value)) {
		return {
			ok: false,
			message: `${cell} is not a whole number; this column takes whole numbers.`
		};
	}
	return { ok: true, value };
}

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
function realDay(y: number, m: number, d: number): boolean {
	if (m < 1 || m > 12 || d < 1) return false;
	const leap = m === 2 && y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0);
	return d <= MONTH_DAYS[m - 1] + (leap ? 1 : 0);
}
const pad = (n: number) => String(n).padStart(2, '0');

/**
 * A calendar day, YYYY-MM-DD. Takes real date cells of a workbook and ISO text. Day-first and
 * month-first text is refused: where the reading is certain the message offers it, otherwise it
 * says why it cannot choose.
 */
export function readImportDate(cell: Cell): Read<string> {
	if (cell instanceof Date) {
		if (Number.isNaN(cell.getTime())) return { ok: false, message: 'Not a date.' };
		// Workbook dates carry no zone; the reader hands them over as UTC midnight.
		return { ok: true, value: cell.toISOString().slice(0, 10) };
	}
	if (typeof cell === 'number') {
		return {
			ok: false,
			message: `${cell} is a plain number, not a date: format the cell as a date or write YYYY-MM-DD.`
		};
	}
	const text = String(cell ?? '').trim();
	let m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
	if (m) {
		const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
		if (!realDay(y, mo, d)) return { ok: false, message: `${text} is not a day of the calendar.` };
		if (y < 1950) return { ok: false, message: `${text} is before 1950; check the year.` };
		return { ok: true, value: text };
	}
	m = /^(\d{1,2})[./-](\d{1,2})[./-](\d{4})$/.exec(text);
	if (m) {
		const [a, b, y] = [Number(m[1]), Number(m[2]), Number(m[3])];
		const dayFirst = realDay(y, b, a) ? `${y}-${pad(b)}-${pad(a)}` : null;
		const monthFirst = realDay(y, a, b) ? `${y}-${pad(a)}-${pad(b)}` : null;
		if (dayFirst && monthFirst && dayFirst !== monthFirst) {
			return {
				ok: false,
				message: `${text} could be ${dayFirst} or ${monthFirst}: write the date as YYYY-MM-DD.`
			};
		}
		const only = dayFirst ?? monthFirst;
		if (only) return { ok: false, message: `Write ${text} as ${only} (YYYY-MM-DD).` };
		return { ok: false, message: `${text} is not a day of the calendar.` };
	}
	return { ok: false, message: `"${text}" is not a date: write YYYY-MM-DD.` };
}

/** Cell as trimmed text ('' for blank). */
export function cellText(cell: Cell): string {
	if (cell === null || cell === undefined) return '';
	if (cell instanceof Date) return cell.toISOString().slice(0, 10);
	return String(cell).trim();
}
