import { fail, redirect } from '@sveltejs/kit';
import { superValidate, message, setError } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { signInSchema } from '$lib/schemas/auth';
import { getDb } from '$lib/server/db';
import { getLucia } from '$lib/server/auth';
import { dummyPasswordHash, verifyPassword } from '$lib/server/auth/password';
import {
	clearAccountFailures,
	recordSignInFailure,
	signInBlockedFor
} from '$lib/server/auth/throttle';
import { findUserByEmail } from '$lib/server/users/users';
import { ROLE_HOME } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

/** Only same-site paths are followed after sign-in. */
function safeRedirect(target: string | null): string | null {
	return target && target.startsWith('/') && !target.startsWith('//') ? target : null;
}

export const load: PageServerLoad = async ({ locals, url }) => {
	if (locals.user)
		redirect(303, safeRedirect(url.searchParams.get('redirectTo')) ?? ROLE_HOME[locals.user.role]);
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
		const address = event.getClientAddress();
		const waitMinutes = await signInBlockedFor(db, form.data.email, address);
		if (waitMinutes > 0) {
			return message(
				form,
				`Too many failed sign-ins. Try again in ${waitMinutes} minute${waitMinutes === 1 ? '' : 's'}, or ask your plant admin to reset your password.`,
				{ status: 429 }
			);
		}
		const user = await findUserByEmail(db, form.data.email);
		const ok = user
			? await verifyPassword(user.password_hash, password)
			: (await verifyPassword(await dummyPasswordHash(), password)) && false;
		if (!user || !ok || !user.active) {
			await recordSignInFailure(db, form.data.email, address);
			return setError(form, 'email', 'That e-mail and password do not match an active account.');
		}
		await clearAccountFailures(db, form.data.email);
		const lucia = getLucia();
		const session = await lucia.createSession(user.id, {});
		const cookie = lucia.createSessionCookie(session.id);
		event.cookies.set(cookie.name, cookie.value, { path: '/', ...cookie.attributes });
		redirect(303, safeRedirect(event.url.searchParams.get('redirectTo')) ?? ROLE_HOME[user.role]);
	}
};
