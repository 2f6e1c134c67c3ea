import { z } from 'zod';
import { decimalNumber, optionalDecimalNumber, optionalWholeNumber, wholeNumber } from './numbers';
import { RETIREMENT_REASONS } from '../domain';
import { MAX_PLAUSIBLE_SHOTS_PER_HOUR } from '../calc/life';

// Optional text stays a string ('' when empty) so the form can round-trip it; the server stores
// empty text as null.
const optionalText = (max: number) =>
	z.string().trim().max(max, `Keep it under ${max} characters.`).default('');

/** Units a die's metal pressure may be entered in; stored as bar. */
export const PRESSURE_UNITS = ['bar', 'MPa', 'psi'] as const;
export type PressureUnit = (typeof PRESSURE_UNITS)[number];
const BAR_PER_UNIT: Record<PressureUnit, number> = {
	bar: 1,
	MPa: 10, // 1 MPa = 10⁶ Pa = 10 bar (unit definition)
	psi: 6894.757293168 / 1e5 // 1 psi = 6 894.757 Pa (unit definition: lbf/in²)
};
/** Lowest and highest metal pressure Castellan takes, bar: die casting spans about 7–7 000 bar
 * overall, but die-casting intensification pressures sit roughly between 50 and 2 000 bar
 * (*common practice*, ../shared/REFERENCES.md "Process facts"). */
export const METAL_PRESSURE_RANGE_BAR = { min: 50, max: 2000 } as const;

/** The form's pressure in bar; null when left empty (the family default applies). */
export function metalPressureBarOf(form: {
	metalPressure?: number;
	metalPressureUnit?: PressureUnit;
}): number | null {
	if (form.metalPressure === undefined) return null;
	const perUnit = BAR_PER_UNIT[form.metalPressureUnit ?? 'bar'];
	return Math.round(form.metalPressure * perUnit * 10) / 10;
}

export const dieNumberPattern = /^[A-Z0-9][A-Z0-9-]{1,19}$/;

export const dieFormSchema = z
	.object({
		number: z
			.string()
			.trim()
			.toUpperCase()
			.regex(dieNumberPattern, 'Use 2–20 capital letters, digits or dashes, e.g. D-0147.'),
		partName: z
			.string()
			.trim()
			.min(1, 'Name the part this die casts.')
			.max(120, 'Keep it under 120 characters.'),
		partNumber: optionalText(60),
		customerId: wholeNumber({ required: 'Choose the owner.', min: [1, 'Choose the owner.'] }),
		alloyId: wholeNumber({ required: 'Choose the alloy.', min: [1, 'Choose the alloy.'] }),
		process: z.enum(['hot_chamber', 'cold_chamber'], { error: 'Choose hot or cold chamber.' }),
		cavities: wholeNumber({
			required: 'Enter the number of cavities.',
			min: [1, 'A die has at least one cavity.'],
			max: [128, 'More than 128 cavities is not plausible.']
		}),
		projectedAreaCm2: decimalNumber({
			required: 'Enter the projected area in cm².',
			gt: [0, 'The projected area must be greater than 0.'],
			max: [50000, 'More than 50 000 cm² is not plausible for a die-casting die.']
		}),
		hasSlides: z.boolean().default(false),
		metalPressure: optionalDecimalNumber({
			gt: [0, 'The metal pressure must be above 0.']
		}).optional(),
		metalPressureUnit: z.enum(PRESSURE_UNITS).optional(),
		location: optionalText(60),
		/** The die's own planned rate for bookings, shots per hour; empty: the press's or the alloy's. */
		plannedShotsPerHour: optionalDecimalNumber({
			gt: [0, 'The planned rate must be above 0.'],
			max: [
				MAX_PLAUSIBLE_SHOTS_PER_HOUR,
				`More than ${MAX_PLAUSIBLE_SHOTS_PER_HOUR} shots per hour is not plausible.`
			]
		}).optional(),
		notes: optionalText(2000),
		expectedLifeShots: optionalWholeNumber({
			min: [1, 'Expected life must be above 0.'],
			max: [10_000_000, 'More than 10 million shots is not plausible.']
		}),
		/** Days a replacement die takes to arrive; empty = the plant's default for the family. */
		replacementLeadDays: optionalWholeNumber({
			min: [1, 'A lead time is at least 1 day.'],
			max: [3650, 'A lead time is at most 3 650 days (10 years).']
		}).optional(),
		coverSerial: z.string().trim().max(40, 'Keep it under 40 characters.').optional(),
		ejectorSerial: z.string().trim().max(40, 'Keep it under 40 characters.').optional(),
		steel: z.string().trim().max(40, 'Keep it under 40 characters.').default('H13')
	})
	.superRefine((form, ctx) => {
		const bar = metalPressureBarOf(form);
		const { min, max } = METAL_PRESSURE_RANGE_BAR;
		if (bar !== null && (bar < min || bar > max)) {
			ctx.addIssue({
				code: 'custom',
				path: ['metalPressure'],
				message: `That is ${Math.round(bar)} bar; die-casting metal pressures lie between ${min} and ${max} bar. Check the figure and its unit.`
			});
		}
	});
export type DieForm = z.infer<typeof dieFormSchema>;

export const dieStatusSchema = z
	.object({
		status: z.enum(['ready', 'running', 'in_toolroom', 'held', 'retired'], {
			error: 'Choose a status.'
		}),
		reason: z.string().trim().min(3, 'Give a reason of at least 3 characters.').max(500),
		/** Asked when retiring: only worn out and cracked count as wear failures in the fleet fit. */
		retirementReason: z.enum([...RETIREMENT_REASONS, '']).default(''),
		// How many press bookings the page said the move would block; -1 when the page did not say
		// (a caller without the page). A different count now stops the move until it is seen.
		seenBlocked: optionalWholeNumber({
			min: [-1, 'Reload the page.'],
			max: [100_000, 'Reload the page.']
		}).transform((v) => v ?? -1),
		/** When holding: why. "owner_decision" asks the die's owner (question, optional quote). */
		holdReason: z.enum(['owner_decision', 'other', '']).default(''),
		ownerQuestion: optionalText(1000),
		quotedHours: optionalDecimalNumber({
			min: [0, 'Hours cannot be negative.'],
			max: [10_000, 'Give at most 10 000 hours.']
		}),
		quotedCost: optionalDecimalNumber({
			min: [0, 'A cost cannot be negative.'],
			max: [100_000_000, 'Give at most 100 000 000.']
		})
	})
	.superRefine((form, ctx) => {
		const asking = form.status === 'held' && form.holdReason === 'owner_decision';
		if (asking && form.ownerQuestion.length < 3) {
			ctx.addIssue({
				code: 'custom',
				path: ['ownerQuestion'],
				message: 'Say what the owner is asked to decide (at least 3 characters).'
			});
		}
		if (
			!asking &&
			(form.ownerQuestion || form.quotedHours !== undefined || form.quotedCost !== undefined)
		) {
			const path = form.ownerQuestion
				? 'ownerQuestion'
				: form.quotedHours !== undefined
					? 'quotedHours'
					: 'quotedCost';
			ctx.addIssue({
				code: 'custom',
				path: [path],
				message: "A question and quote go only with holding the die for the owner's decision."
			});
		}
		if (form.status !== 'held' && form.holdReason !== '') {
			ctx.addIssue({
				code: 'custom',
				path: ['holdReason'],
				message: 'A hold reason goes only with moving the die to held.'
			});
		}
		if (form.status === 'retired' && form.retirementReason === '') {
			ctx.addIssue({
				code: 'custom',
				path: ['retirementReason'],
				message: 'Say why the die is retired.'
			});
		}
		if (form.status !== 'retired' && form.retirementReason !== '') {
			ctx.addIssue({
				code: 'custom',
				path: ['retirementReason'],
				message: 'A retirement reason goes only with moving the die to retired.'
			});
		}
	});

export const dieListQuerySchema = z.object({
	q: z.string().trim().max(80).catch(''),
	status: z.enum(['ready', 'running', 'in_toolroom', 'held', 'retired', 'active', '']).catch(''),
	owner: z.string().trim().max(20).catch(''),
	family: z.enum(['zinc', 'magnesium', 'aluminium', 'copper', '']).catch(''),
	sort: z
		.enum(['number', 'part', 'partNumber', 'owner', 'alloy', 'status', 'shots', 'life'])
		.catch('number'),
	dir: z.enum(['asc', 'desc']).catch('asc'),
	page: z.coerce.number().int().min(1).max(100000).catch(1),
	size: z.coerce.number().int().min(10).max(200).catch(50)
});
export type DieListQuery = z.infer<typeof dieListQuerySchema>;

/** The owner's answer to a decision the toolroom lead asked for (owner portal). */
export const ownerAnswerSchema = z
	.object({
		decision: wholeNumber({ required: 'Reload the page.', min: [1, 'Reload the page.'] }),
		// Starts on no choice ('') so that nothing is answered by leaving the form as it came.
		answer: z
			.enum(['approve_repair', 'order_replacement', 'retire', 'write_back', ''], {
				error: 'Choose an answer.'
			})
			.default('')
			.refine((v) => v !== '', 'Choose an answer.'),
		text: optionalText(2000)
	})
	.superRefine((form, ctx) => {
		if (form.answer === 'write_back' && form.text.length < 3) {
			ctx.addIssue({
				code: 'custom',
				path: ['text'],
				message: 'Write your reply (at least 3 characters).'
			});
		}
	});

/** Asking the owner of a die that is already held (the die page's "Ask the owner" form). */
export const askOwnerSchema = z.object({
	ownerQuestion: z
		.string()
		.trim()
		.min(3, 'Say what the owner is asked to decide (at least 3 characters).')
		.max(1000, 'Keep it under 1000 characters.'),
	quotedHours: optionalDecimalNumber({
		min: [0, 'Hours cannot be negative.'],
		max: [10_000, 'Give at most 10 000 hours.']
	}),
	quotedCost: optionalDecimalNumber({
		min: [0, 'A cost cannot be negative.'],
		max: [100_000_000, 'Give at most 100 000 000.']
	})
});
