/**
 * Zod fields for numbers people type, on top of the one parser (`$lib/parse-number`).
 *
 * Why not `z.coerce.number()` or `z.number()`: superforms reads a field whose schema says
 * "number" with parseInt/parseFloat before zod sees it (`3.9` → 3, `12abc` → 12, `1e7` → 1), and
 * `Number()` takes `1e7`, `0x10` and blanks as 0. These fields take the text as typed (their
 * schema ends in a transform, which superforms passes through untouched), read it strictly and
 * check the bounds, all in one step, so a form with or without JavaScript, the API's JSON numbers
 * and the CSV reader all judge a number the same way.
 */
import { z } from 'zod';
import { parseTypedNumber, type NumberKind } from '../parse-number';

/** A bound and the message shown when it is crossed. */
type Bound = readonly [number, string];

export interface NumberRules {
	/** Shown when the field is left empty (required fields only). */
	required?: string;
	min?: Bound;
	/** Strictly greater than. */
	gt?: Bound;
	max?: Bound;
	/** Strictly less than. */
	lt?: Bound;
}

const typedInput = z.union([z.string(), z.number()]).nullish();

function read(kind: NumberKind, rules: NumberRules, optional: boolean) {
	return typedInput.transform((raw, ctx): number | undefined => {
		const parsed = parseTypedNumber(raw, kind);
		if (!parsed.ok) {
			ctx.addIssue({ code: 'custom', message: parsed.message });
			return z.NEVER;
		}
		if (parsed.blank) {
			if (optional) return undefined;
			ctx.addIssue({ code: 'custom', message: rules.required ?? 'Enter a number.' });
			return z.NEVER;
		}
		const n = parsed.value;
		const crossed =
			(rules.min && n < rules.min[0] && rules.min) ||
			(rules.gt && n <= rules.gt[0] && rules.gt) ||
			(rules.max && n > rules.max[0] && rules.max) ||
			(rules.lt && n >= rules.lt[0] && rules.lt);
		if (crossed) {
			ctx.addIssue({ code: 'custom', message: crossed[1] });
			return z.NEVER;
		}
		return n;
	});
}

/** A required whole number (shots, cavities, counter readings). */
export const wholeNumber = (rules: NumberRules) =>
	read('whole', rules, false) as z.ZodType<number, string | number | null | undefined>;

/** A whole number that may be left empty (undefined when empty). */
export const optionalWholeNumber = (rules: NumberRules) =>
	read('whole', rules, true) as z.ZodType<number | undefined, string | number | null | undefined>;

/** A required decimal number; a point or an unambiguous comma is the decimal mark. */
export const decimalNumber = (rules: NumberRules) =>
	read('decimal', rules, false) as z.ZodType<number, string | number | null | undefined>;

/** A decimal number that may be left empty (undefined when empty). */
export const optionalDecimalNumber = (rules: NumberRules) =>
	read('decimal', rules, true) as z.ZodType<number | undefined, string | number | null | undefined>;

/** The same, with null for empty (toolroom records store null). */
export const nullableDecimalNumber = (rules: NumberRules) =>
	read('decimal', rules, true).transform((v) => v ?? null) as z.ZodType<
		number | null,
		string | number | null | undefined
	>;
