import { z } from 'zod';

// Optional text stays a string ('' when empty) so the form can round-trip it; the server stores
// empty text as null.
const optionalText = (max: number) =>
	z.string().trim().max(max, `Keep it under ${max} characters.`).default('');

export const dieNumberPattern = /^[A-Z0-9][A-Z0-9-]{1,19}$/;

export const dieFormSchema = z.object({
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
	customerId: z.coerce.number({ error: 'Choose the owner.' }).int().positive('Choose the owner.'),
	alloyId: z.coerce.number({ error: 'Choose the alloy.' }).int().positive('Choose the alloy.'),
	process: z.enum(['hot_chamber', 'cold_chamber'], { error: 'Choose hot or cold chamber.' }),
	cavities: z.coerce
		.number({ error: 'Enter the number of cavities.' })
		.int('Cavities must be a whole number.')
		.min(1, 'A die has at least one cavity.')
		.max(128, 'More than 128 cavities is not plausible.'),
	projectedAreaCm2: z.coerce
		.number({ error: 'Enter the projected area in cm².' })
		.gt(0, 'The projected area must be greater than 0.')
		.max(50000, 'More than 50 000 cm² is not plausible for a die-casting die.'),
	hasSlides: z.boolean().default(false),
	location: optionalText(60),
	notes: optionalText(2000),
	expectedLifeShots: z.preprocess(
		(v) => (v === '' || v === null || v === undefined ? undefined : v),
		z.coerce
			.number()
			.int('Enter whole shots.')
			.positive('Expected life must be above 0.')
			.max(10_000_000, 'More than 10 million shots is not plausible.')
			.optional()
	),
	coverSerial: z.string().trim().max(40, 'Keep it under 40 characters.').optional(),
	ejectorSerial: z.string().trim().max(40, 'Keep it under 40 characters.').optional(),
	steel: z.string().trim().max(40, 'Keep it under 40 characters.').default('H13')
});
export type DieForm = z.infer<typeof dieFormSchema>;

export const dieStatusSchema = z.object({
	status: z.enum(['ready', 'running', 'in_toolroom', 'held', 'retired'], {
		error: 'Choose a status.'
	}),
	reason: z.string().trim().min(3, 'Give a reason of at least 3 characters.').max(500),
	// How many press bookings the page said the move would block; -1 when the page did not say
	// (a caller without the page). A different count now stops the move until it is seen.
	seenBlocked: z.coerce.number().int().min(-1).max(100_000).default(-1)
});

export const dieListQuerySchema = z.object({
	q: z.string().trim().max(80).catch(''),
	status: z.enum(['ready', 'running', 'in_toolroom', 'held', 'retired', 'active', '']).catch(''),
	owner: z.string().trim().max(20).catch(''),
	family: z.enum(['zinc', 'magnesium', 'aluminium', 'copper', '']).catch(''),
	sort: z.enum(['number', 'part', 'owner', 'alloy', 'status', 'shots', 'life']).catch('number'),
	dir: z.enum(['asc', 'desc']).catch('asc'),
	page: z.coerce.number().int().min(1).max(100000).catch(1),
	size: z.coerce.number().int().min(10).max(200).catch(50)
});
export type DieListQuery = z.infer<typeof dieListQuerySchema>;
