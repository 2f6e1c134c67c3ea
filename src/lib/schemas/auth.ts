import { z } from 'zod';
import { API_SCOPES } from '../roles';

export const MIN_PASSWORD_LENGTH = 10;

export const signInSchema = z.object({
	email: z.string().trim().email('Enter the e-mail address of your account.').max(200),
	password: z.string().min(1, 'Enter your password.').max(200)
});

const newPassword = z
	.string()
	.min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
	.max(200, 'Use at most 200 characters.');

export const changePasswordSchema = z
	.object({
		currentPassword: z.string().min(1, 'Enter your current password.'),
		newPassword,
		confirmPassword: z.string()
	})
	.refine((v) => v.newPassword === v.confirmPassword, {
		path: ['confirmPassword'],
		message: 'The two new passwords differ.'
	});

export const preferencesSchema = z.object({
	unitSystem: z.enum(['metric', 'us']),
	noticesEnabled: z.boolean().default(false)
});

/** New accounts start with the least plant role; admin is a deliberate, confirmed choice. */
export const DEFAULT_NEW_USER_ROLE = 'toolmaker';

export const newUserSchema = z
	.object({
		email: z.string().trim().email('Enter a valid e-mail address.').max(200),
		name: z.string().trim().min(2, 'Enter the person’s name.').max(100),
		role: z
			.enum(['admin', 'toolroom_lead', 'toolmaker', 'scheduler', 'customer'], {
				error: 'Choose a role.'
			})
			.default(DEFAULT_NEW_USER_ROLE),
		customerId: z.preprocess(
			(v) => (v === '' || v === null ? undefined : v),
			z.coerce.number().int().positive().optional()
		),
		confirmAdmin: z.boolean().default(false),
		password: newPassword
	})
	.refine((v) => v.role !== 'admin' || v.confirmAdmin, {
		path: ['confirmAdmin'],
		message:
			'A plant admin may change users, tokens and settings. Tick the box to confirm this account gets that.'
	});

export const resetPasswordSchema = z.object({ userId: z.string().min(1), password: newPassword });

export const tokenSchema = z.object({
	name: z.string().trim().min(2, 'Name the token after the system that uses it.').max(80),
	scopes: z.array(z.enum(API_SCOPES)).min(1, 'Choose at least one scope.'),
	customerId: z.preprocess(
		(v) => (v === '' || v === null ? undefined : v),
		z.coerce.number().int().positive().optional()
	),
	/** Last day the token works (UTC); empty = no expiry. Checked against today on the server. */
	expiresOn: z
		.string()
		.trim()
		.regex(/^(\d{4}-\d{2}-\d{2})?$/, 'Give the last day as a date, or leave it empty.')
		.default('')
});
