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

export const newUserSchema = z.object({
	email: z.string().trim().email('Enter a valid e-mail address.').max(200),
	name: z.string().trim().min(2, 'Enter the person’s name.').max(100),
	role: z.enum(['admin', 'toolroom_lead', 'toolmaker', 'scheduler', 'customer'], {
		error: 'Choose a role.'
	}),
	customerId: z.preprocess(
		(v) => (v === '' || v === null ? undefined : v),
		z.coerce.number().int().positive().optional()
	),
	password: newPassword
});

export const resetPasswordSchema = z.object({ userId: z.string().min(1), password: newPassword });

export const tokenSchema = z.object({
	name: z.string().trim().min(2, 'Name the token after the system that uses it.').max(80),
	scopes: z.array(z.enum(API_SCOPES)).min(1, 'Choose at least one scope.'),
	customerId: z.preprocess(
		(v) => (v === '' || v === null ? undefined : v),
		z.coerce.number().int().positive().optional()
	)
});
