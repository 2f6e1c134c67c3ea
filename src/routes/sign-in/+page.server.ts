import { fail, redirect } from '@sveltejs/kit';
import { superValidate, message, setError } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { signInSchema } from '$lib/schemas/auth';
import { getDb } from '$lib/server/db';
import { getLucia } from '$lib/server/auth';
import { safeRedirectTarget } from '$lib/server/auth/redirect';
import { checkPassword, tooManyAttemptsMessage } from '$lib/server/auth/sign-in';
import { ROLE_HOME } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	if (locals.user)
		redirect(
			303,
			safeRedirectTarget(url.searchParams.get('redirectTo'), url.origin) ??
				ROLE_HOME[locals.user.role]
		);
	return { form: await superValidate(zod4(signInSchema)) };
};

export const actions: Actions = {
	default: async (event) => {
		const form = await superValidate(event.request, zod4(signInSchema));
		// Never send the password back to the browser.
		const password = form.data.password;
		form.data.password = '';
		if (!form.valid) return fail(400, { form });
		const db = getDb();
		const check = await checkPassword(db, form.data.email, password, event.getClientAddress());
		if (check.kind === 'blocked') {
			return message(form, tooManyAttemptsMessage(check.waitMinutes), { status: 429 });
		}
		if (check.kind === 'wrong') {
			return setError(form, 'email', 'That e-mail and password do not match an active account.');
		}
		const user = check.user;
		const lucia = getLucia();
		// Signing in again ends the session this browser had before.
		if (event.locals.session) await lucia.invalidateSession(event.locals.session.id);
		const session = await lucia.createSession(user.id, {});
		const cookie = lucia.createSessionCookie(session.id);
		event.cookies.set(cookie.name, cookie.value, { path: '/', ...cookie.attributes });
		redirect(
			303,
			safeRedirectTarget(event.url.searchParams.get('redirectTo'), event.url.origin) ??
				ROLE_HOME[user.role]
		);
	}
};
