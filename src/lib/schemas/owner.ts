import { z } from 'zod';
import { MIN_PASSWORD_LENGTH } from './auth';

/** Sort keys of the owner's die list; `eol` is the projected end of life, `service` the due band. */
export const OWNER_SORTS = ['number', 'part', 'status', 'shots', 'life', 'eol', 'service'] as const;
export type OwnerSort = (typeof OWNER_SORTS)[number];

// Bad values fall back to defaults: a hand-edited URL shows the list, never an error.
export const ownerDieQuerySchema = z.object({
	q: z.string().trim().max(80).catch(''),
	status: z.enum(['active', 'retired', '']).catch(''),
	sort: z.enum(OWNER_SORTS).catch('number'),
	dir: z.enum(['asc', 'desc']).catch('asc'),
	page: z.coerce.number().int().min(1).max(100000).catch(1),
	size: z.coerce.number().int().min(10).max(200).catch(50)
});
export type OwnerDieQuery = z.infer<typeof ownerDieQuerySchema>;

export const inviteSchema = z.object({
	customerId: z.coerce
		.number({ error: 'Choose the customer.' })
		.int()
		.positive('Choose the customer.'),
	name: z
		.string()
		.trim()
		.min(2, 'Enter the person’s name.')
		.max(100, 'Keep it under 100 characters.'),
	email: z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(200),
	/** Ticked after being told the address is outside the customer's known e-mail domains. */
	confirmDomain: z.boolean().default(false)
});
export type InviteForm = z.infer<typeof inviteSchema>;

/** What the admin sees once after sending: the link (to pass on if the mail failed) and how it went. */
export interface InviteOutcome {
	email: string;
	link: string;
	sent: boolean;
	error?: string;
	/** Open invitations to the same address that the new one replaced. */
	replaced?: number;
}

export const acceptInviteSchema = z
	.object({
		password: z
			.string()
			.min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
			.max(200, 'Use at most 200 characters.'),
		confirmPassword: z.string()
	})
	.refine((v) => v.password === v.confirmPassword, {
		path: ['confirmPassword'],
		message: 'The two passwords differ.'
	});

/** One toolroom job's owner summary and whether the owner sees it. */
export const shareJobSchema = z.object({
	job: z
		.string()
		.trim()
		.regex(/^TJ-\d{5,}$/, 'No job given.'),
	ownerSummary: z.string().trim().max(1000, 'Keep the summary under 1000 characters.').default(''),
	shared: z.preprocess((v) => v === 'on' || v === 'true' || v === true, z.boolean())
});

/** One photo shown to or hidden from the owner. */
export const sharePhotoSchema = z.object({
	photo: z
		.string()
		.trim()
		.regex(/^[A-Za-z0-9_-]{8,64}$/, 'No photo given.'),
	shared: z.preprocess((v) => v === 'on' || v === 'true' || v === true, z.boolean())
});
