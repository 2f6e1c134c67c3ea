import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { changePasswordSchema, preferencesSchema } from '$lib/schemas/auth';
import { requireUser } from '$lib/server/auth/guard';
import { getLucia } from '$lib/server/auth';
import { passwordWeakness } from '$lib/server/auth/password-strength';
import { checkPassword, tooManyAttemptsMessage } from '$lib/server/auth/sign-in';
import { getDb } from '$lib/server/db';
import { getUserById, setUserPassword, updateUserPreferences } from '$lib/server/users/users';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const row = await getUserById(getDb(), user.id);
	const [passwordForm, preferencesForm] = await Promise.all([
		superValidate(zod4(changePasswordSchema)),
		superValidate(
			{ unitSystem: row?.unit_system ?? 'metric', noticesEnabled: row?.notices_enabled === 1 },
			zod4(preferencesSchema)
		)
	]);
	return {
		mustChangePassword: user.mustChangePassword,
		passwordForm,
		preferencesForm,
		showNotices:
			user.role === 'toolroom_lead' || user.role === 'toolmaker' || user.role === 'scheduler'
	};
};

export const actions: Actions = {
	password: async (event) => {
		const user = requireUser(event);
		const form = await superValidate(event.request, zod4(changePasswordSchema));
		const { currentPassword, newPassword } = form.data;
		form.data = { currentPassword: '', newPassword: '', confirmPassword: '' };
		if (!form.valid) return fail(400, { passwordForm: form });
		const db = getDb();
		const row = await getUserById(db, user.id);
		const weak = passwordWeakness(newPassword, [user.email, user.name]);
		if (weak) return setError(form, 'newPassword', weak);
		// Throttled like sign-in: a stolen session must not become a password-guessing oracle.
		const check = row
			? await checkPassword(db, row.email, currentPassword, event.getClientAddress())
			: ({ kind: 'wrong' } as const);
		if (check.kind === 'blocked') {
			return setError(form, 'currentPassword', tooManyAttemptsMessage(check.waitMinutes), {
				status: 429
			});
		}
		if (check.kind === 'wrong') {
			return setError(form, 'currentPassword', 'The current password is wrong.');
		}
		await setUserPassword(db, user.id, newPassword, user.id);
		// Other sessions ended with the change; keep this one signed in.
		const lucia = getLucia();
		const session = await lucia.createSession(user.id, {});
		const cookie = lucia.createSessionCookie(session.id);
		event.cookies.set(cookie.name, cookie.value, { path: '/', ...cookie.attributes });
		return message(form, 'Password changed. Other devices were signed out.');
	},
	preferences: async (event) => {
		const user = requireUser(event);
		const form = await superValidate(event.request, zod4(preferencesSchema));
		if (!form.valid) return fail(400, { preferencesForm: form });
		await updateUserPreferences(getDb(), user.id, form.data);
		return message(form, 'Preferences saved.');
	}
};
