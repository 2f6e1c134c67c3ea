import { redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { acceptInviteSchema } from '$lib/schemas/owner';
import { getLucia } from '$lib/server/auth';
import { passwordWeakness } from '$lib/server/auth/password-strength';
import { getDb } from '$lib/server/db';
import {
	acceptInvitation,
	findInvitationByToken,
	refusalMessage
} from '$lib/server/owner/invitations';
import type { Actions, PageServerLoad } from './$types';

// Public on purpose: the one-time secret in the URL is the credential. Nothing is shown about the
// invitation unless the link is still open.
export const load: PageServerLoad = async ({ params }) => {
	const invite = await findInvitationByToken(getDb(), params.token);
	const state = invite?.state ?? 'unknown';
	return {
		invite: invite?.state === 'open' ? invite : null,
		refusal: state === 'open' ? null : refusalMessage(state),
		form: await superValidate(zod4(acceptInviteSchema))
	};
};

export const actions: Actions = {
	default: async (event) => {
		const form = await superValidate(event.request, zod4(acceptInviteSchema));
		const password = form.data.password;
		// Never send passwords back to the browser.
		form.data.password = '';
		form.data.confirmPassword = '';
		if (!form.valid) return message(form, 'Check the password fields.', { status: 400 });
		const invite = await findInvitationByToken(getDb(), event.params.token);
		const weak = passwordWeakness(password, [invite?.email ?? '', invite?.name ?? '']);
		if (weak) return setError(form, 'password', weak);
		const result = await acceptInvitation(getDb(), event.params.token, password);
		if (!result.ok) return message(form, result.message, { status: 400 });
		const lucia = getLucia();
		const session = await lucia.createSession(result.userId, {});
		const cookie = lucia.createSessionCookie(session.id);
		event.cookies.set(cookie.name, cookie.value, { path: '/', ...cookie.attributes });
		redirect(303, '/owner');
	}
};
