// The plant identity form (admin settings) and the replacement lead-time defaults per family.
import { z } from 'zod';
import { nullableDecimalNumber, wholeNumber } from './numbers';

export const plantIdentitySchema = z.object({
	name: z.string().trim().max(120, 'Keep the name under 120 characters.').default(''),
	address: z.string().trim().max(400, 'Keep the address under 400 characters.').default(''),
	contactEmail: z
		.union([z.literal(''), z.string().trim().email('Enter a valid e-mail address.')])
		.default(''),
	contactPhone: z
		.string()
		.trim()
		.max(40, 'Keep the phone number under 40 characters.')
		.regex(/^[0-9+()\-./ ]*$/, 'Use digits, spaces and + ( ) - . / only.')
		.default(''),
	statementFooter: z.string().trim().max(300, 'Keep the footer under 300 characters.').default(''),
	repairRatePerHour: nullableDecimalNumber({
		min: [0, 'The hourly rate cannot be below 0.'],
		max: [100_000, 'The hourly rate must be under 100 000.']
	}),
	currency: z
		.string()
		.trim()
		.toUpperCase()
		.regex(/^[A-Z]{3}$/, 'Use a three-letter currency code (ISO 4217), e.g. EUR.')
});
export type PlantIdentityForm = z.infer<typeof plantIdentitySchema>;

const leadDays = wholeNumber({
	required: 'Enter the lead time in days.',
	min: [1, 'A lead time is at least 1 day.'],
	max: [3650, 'A lead time is at most 3 650 days (10 years).']
});

export const leadDefaultsSchema = z.object({
	zinc: leadDays,
	magnesium: leadDays,
	aluminium: leadDays,
	copper: leadDays
});
export type LeadDefaultsForm = z.infer<typeof leadDefaultsSchema>;
