/**
 * The one reader of numbers typed by people: every form field and every CSV number cell goes
 * through here, so `3.9` in a whole-number field, `12abc`, `2e1` or `1e7` are refused with a
 * message naming what was typed, never truncated by parseInt/parseFloat or widened by Number().
 *
 * Rules (Castellan's own, chosen so nothing is read two ways):
 * - digits with an optional leading sign (`-`, `−` or `+`);
 * - spaces (also no-break and thin spaces) and apostrophes may group digits in threes: `50 512`;
 * - a decimal field takes a point or a comma as decimal mark: `18.5` and `18,5` are 18.5;
 * - a lone comma followed by exactly three digits (`1,250`) could be a thousands separator or a
 *   decimal comma, so a decimal field refuses it and asks for the number without separators;
 * - a whole-number field has no decimals, so comma groups of three can only be thousands:
 *   `50,512` (as Castellan itself prints counts) is 50512; `1.250` is refused as ambiguous;
 * - with both marks (`1,250.5`, `1.250,5`) the last one is the decimal mark and the other must
 *   group in threes;
 * - powers of ten (`1e7`), hex, `Infinity`, `NaN` and stray letters are refused.
 */

export type NumberKind = 'whole' | 'decimal';

export type ParsedNumber =
	| { ok: true; value: number; blank: false }
	| { ok: true; value: null; blank: true }
	| { ok: false; message: string };

const SPACE_CHARS = /[\s\u00a0\u202f\u2009']/;
const SPACE_CHARS_ALL = /[\s\u00a0\u202f\u2009']/g;
const SPACE_GROUPED = /^\d{1,3}([\s\u00a0\u202f\u2009']\d{3})+$/;
const COMMA_GROUPED = /^\d{1,3}(,\d{3})+$/;
const POINT_GROUPED = /^\d{1,3}(\.\d{3})+$/;
const DIGITS = /^\d+$/;
/** Float64 holds 15 significant digits exactly. */
const MAX_DIGITS = 15;

/** What was typed, in quotes, cut short and without control characters. */
export function quoteTyped(raw: string): string {
	// eslint-disable-next-line no-control-regex
	const shown = raw.replace(/[\u0000-\u001f\u007f]/g, '').trim();
	return `“${shown.length > 24 ? `${shown.slice(0, 24)}…` : shown}”`;
}

const refuse = (message: string): ParsedNumber => ({ ok: false, message });

/** The digits of `body` with one `.` as decimal mark, or a refusal. */
function normalize(body: string, kind: NumberKind, typed: string): string | ParsedNumber {
	const notANumber = refuse(
		`${typed} is not a number; use digits${kind === 'decimal' ? ' and one decimal point' : ' only'}.`
	);
	if (/^\d*[.,]?\d+e[-+]?\d+$/i.test(body)) {
		return refuse(`${typed} is written as a power of ten; type the number in full digits.`);
	}
	if (!/^[\d.,\s\u00a0\u202f\u2009']+$/.test(body) || !/\d/.test(body)) return notANumber;
	if (SPACE_CHARS.test(body)) {
		const cut = body.search(/[.,]/);
		const intPart = cut < 0 ? body : body.slice(0, cut);
		const rest = cut < 0 ? '' : body.slice(cut);
		if (!SPACE_GROUPED.test(intPart) || SPACE_CHARS.test(rest)) {
			return refuse(`${typed}: spaces may only group digits in threes, e.g. 50 512.`);
		}
		body = intPart.replace(SPACE_CHARS_ALL, '') + rest;
	}
	const commas = body.split(',').length - 1;
	const points = body.split('.').length - 1;
	if (commas === 0 && points === 0) return body;
	if (commas > 0 && points > 0) {
		const decimalMark = body.lastIndexOf(',') > body.lastIndexOf('.') ? ',' : '.';
		const at = body.lastIndexOf(decimalMark);
		const intPart = body.slice(0, at);
		const frac = body.slice(at + 1);
		const grouped = decimalMark === ',' ? POINT_GROUPED : COMMA_GROUPED;
		if (body.indexOf(decimalMark) !== at || !grouped.test(intPart) || !DIGITS.test(frac)) {
			return refuse(
				`${typed} mixes commas and points in a way that can be read two ways; type it without thousands separators.`
			);
		}
		return `${intPart.replace(/[.,]/g, '')}.${frac}`;
	}
	const mark = commas > 0 ? ',' : '.';
	const name = mark === ',' ? 'comma' : 'point';
	if (commas + points > 1) {
		// 1,250,000 is thousands in a whole-number field; anything else is a guess.
		if (kind === 'whole' && COMMA_GROUPED.test(body)) return body.replace(/,/g, '');
		return refuse(
			`${typed} has more than one ${name}; type the number without thousands separators.`
		);
	}
	const at = body.indexOf(mark);
	const intPart = body.slice(0, at);
	const frac = body.slice(at + 1);
	if (!DIGITS.test(frac) || (intPart !== '' && !DIGITS.test(intPart))) return notANumber;
	const couldBeThousands = frac.length === 3 && /^[1-9]\d{0,2}$/.test(intPart);
	if (kind === 'whole') {
		if (mark === ',' && couldBeThousands) return intPart + frac;
		if (couldBeThousands) {
			const small = String(Number(`${intPart}.${frac}`));
			return refuse(
				`${typed} could be ${intPart}${frac} or ${small}; type ${intPart}${frac} without a separator.`
			);
		}
		return refuse(`${typed} is not a whole number.`);
	}
	if (mark === ',' && couldBeThousands) {
		const small = String(Number(`${intPart}.${frac}`));
		return refuse(
			`${typed} could be ${intPart}${frac} or ${small}; type ${intPart}${frac} or ${small}.`
		);
	}
	return `${intPart === '' ? '0' : intPart}.${frac}`;
}

/** Reads one typed number; blank (empty or spaces) is `{ blank: true }`, for the caller to judge. */
export function parseTypedNumber(input: unknown, kind: NumberKind): ParsedNumber {
	if (input === null || input === undefined) return { ok: true, value: null, blank: true };
	if (typeof input === 'number') {
		// Already a number (JSON, or a form shown again after saving): still finite and, for a
		// whole-number field, whole.
		if (!Number.isFinite(input)) return refuse('Enter a number.');
		if (kind === 'whole' && !Number.isInteger(input)) {
			return refuse(`${quoteTyped(String(input))} is not a whole number.`);
		}
		return { ok: true, value: input, blank: false };
	}
	if (typeof input !== 'string') return refuse('Enter a number.');
	const trimmed = input.trim();
	if (trimmed === '') return { ok: true, value: null, blank: true };
	const typed = quoteTyped(input);
	const signed = /^[-−+]/.test(trimmed);
	const sign = signed && trimmed[0] !== '+' ? -1 : 1;
	const digits = normalize(signed ? trimmed.slice(1) : trimmed, kind, typed);
	if (typeof digits !== 'string') return digits;
	if (digits.replace('.', '').replace(/^0+/, '').length > MAX_DIGITS) {
		return refuse(`${typed} has more digits than Castellan can keep exactly.`);
	}
	const value = sign * Number(digits);
	if (!Number.isFinite(value)) return refuse(`${typed} is not a number.`);
	if (kind === 'whole' && !Number.isInteger(value))
		return refuse(`${typed} is not a whole number.`);
	return { ok: true, value: value === 0 ? 0 : value, blank: false };
}

const readAsFormat = new Intl.NumberFormat('en-GB', {
	maximumFractionDigits: 6,
	useGrouping: false
});

/**
 * How a typed value was read, for the hint beside the field ("read as 18.5 L/min"); null when
 * blank or refused (the field message says why).
 */
export function describeReading(input: unknown, kind: NumberKind, unit = ''): string | null {
	const parsed = parseTypedNumber(input, kind);
	if (!parsed.ok || parsed.blank) return null;
	return `read as ${readAsFormat.format(parsed.value)}${unit ? ` ${unit}` : ''}`;
}
