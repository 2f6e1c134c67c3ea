// Which period a statement covers, as typed in the owner's statement form (a GET form, so the
// address of a statement can be kept and shared). Every field error names the field.
import { z } from 'zod';
import { resolvePeriod, type PeriodSpec, type StatementPeriod } from '../calc/statement-period';
import { optionalWholeNumber } from './numbers';

export const PERIOD_KINDS = ['month', 'quarter', 'year', 'custom'] as const;
export const PERIOD_KIND_LABELS: Record<(typeof PERIOD_KINDS)[number], string> = {
	month: 'Month',
	quarter: 'Quarter',
	year: 'Year',
	custom: 'Custom dates'
};

const text = z
	.string()
	.optional()
	.transform((v) => v?.trim() ?? '');

export const statementPeriodSchema = z
	.object({
		kind: z.enum(PERIOD_KINDS, { message: 'Pick a month, a quarter, a year or custom dates.' }),
		year: optionalWholeNumber({
			min: [2000, 'Pick a year from 2000.'],
			max: [2100, 'Pick a year up to 2100.']
		}),
		month: optionalWholeNumber({
			min: [1, 'A month is 1 to 12.'],
			max: [12, 'A month is 1 to 12.']
		}),
		quarter: optionalWholeNumber({
			min: [1, 'A quarter is 1 to 4.'],
			max: [4, 'A quarter is 1 to 4.']
		}),
		from: text,
		to: text
	})
	.transform((v, ctx): StatementPeriod => {
		const need = (field: 'year' | 'month' | 'quarter' | 'from' | 'to', message: string) => {
			ctx.addIssue({ code: 'custom', path: [field], message });
			return z.NEVER;
		};
		let spec: PeriodSpec;
		if (v.kind === 'custom') {
			if (!v.from) return need('from', 'Enter the first day (YYYY-MM-DD).');
			if (!v.to) return need('to', 'Enter the last day (YYYY-MM-DD).');
			spec = { kind: 'custom', from: v.from, to: v.to };
		} else {
			if (v.year === undefined) return need('year', 'Enter the year.');
			if (v.kind === 'month') {
				if (v.month === undefined) return need('month', 'Pick the month.');
				spec = { kind: 'month', year: v.year, month: v.month };
			} else if (v.kind === 'quarter') {
				if (v.quarter === undefined) return need('quarter', 'Pick the quarter.');
				spec = { kind: 'quarter', year: v.year, quarter: v.quarter };
			} else {
				spec = { kind: 'year', year: v.year };
			}
		}
		try {
			const period = resolvePeriod(spec);
			if (period.kind === 'custom' && period.from.slice(0, 4) < '2000') {
				return need('from', 'Pick a first day from 2000.');
			}
			return period;
		} catch (error) {
			const message = error instanceof Error ? error.message : String(error);
			const field =
				v.kind === 'custom'
					? message.includes(`"${v.to}"`) || message.includes('before')
						? 'to'
						: 'from'
					: 'year';
			return need(field, message);
		}
	});

export type StatementPeriodInput = z.input<typeof statementPeriodSchema>;
