import { z } from 'zod';
import { optionalDecimalNumber, wholeNumber } from './numbers';

export const customerSchema = z.object({
	id: z.preprocess(
		(v) => (v === '' || v === '0' ? undefined : v),
		z.coerce.number().int().positive().optional()
	),
	code: z
		.string()
		.trim()
		.toUpperCase()
		.regex(/^[A-Z0-9]{2,12}$/, 'Use 2–12 capital letters or digits, e.g. NORDPUMP.'),
	name: z
		.string()
		.trim()
		.min(2, 'Enter the customer’s name.')
		.max(120, 'Keep it under 120 characters.'),
	contactEmail: z
		.union([z.literal(''), z.string().trim().email('Enter a valid e-mail address.')])
		.default('')
});

export const alloySchema = z
	.object({
		id: z.preprocess(
			(v) => (v === '' || v === '0' ? undefined : v),
			z.coerce.number().int().positive().optional()
		),
		code: z
			.string()
			.trim()
			.toUpperCase()
			.regex(/^[A-Z0-9-]{2,20}$/, 'Use 2–20 capital letters, digits or dashes.'),
		name: z.string().trim().min(2, 'Name the alloy.').max(80),
		family: z.enum(['zinc', 'magnesium', 'aluminium', 'copper'], { error: 'Choose the family.' }),
		expectedLifeShots: wholeNumber({
			required: 'Enter the expected life in shots.',
			min: [100, 'At least 100 shots.'],
			max: [10_000_000, 'More than 10 million shots is not plausible.']
		}),
		densityKgM3: optionalDecimalNumber({
			min: [500, 'Density in kg/m³ (e.g. 2710).'],
			max: [20000, 'Density in kg/m³ (e.g. 2710).']
		}),
		specificHeatJKgK: optionalDecimalNumber({
			min: [50, 'Specific heat in J/(kg·K), 50–5000.'],
			max: [5000, 'Specific heat in J/(kg·K), 50–5000.']
		}),
		latentHeatJKg: optionalDecimalNumber({
			min: [1000, 'Latent heat in J/kg, 1000–2 000 000.'],
			max: [2_000_000, 'Latent heat in J/kg, 1000–2 000 000.']
		}),
		solidusC: optionalDecimalNumber({
			min: [100, 'Solidus 100–1500 °C.'],
			max: [1500, 'Solidus 100–1500 °C.']
		}),
		liquidusC: optionalDecimalNumber({
			min: [100, 'Liquidus 100–1500 °C.'],
			max: [1500, 'Liquidus 100–1500 °C.']
		}),
		pourTempC: optionalDecimalNumber({
			min: [100, 'Pour 100–1600 °C.'],
			max: [1600, 'Pour 100–1600 °C.']
		}),
		/** Ticked after the admin saw which dies change state with the new expected life. */
		confirmImpact: z.boolean().default(false)
	})
	.refine(
		(a) => a.solidusC === undefined || a.liquidusC === undefined || a.liquidusC >= a.solidusC,
		{
			path: ['liquidusC'],
			message: 'Liquidus must be at or above solidus.'
		}
	);
