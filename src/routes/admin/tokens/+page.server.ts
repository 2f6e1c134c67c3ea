import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { tokenSchema } from '$lib/schemas/auth';
import { requireRole } from '$lib/server/auth/guard';
import { createApiToken, listApiTokens, revokeApiToken } from '$lib/server/auth/tokens';
import { getDb } from '$lib/server/db';
import { tokenExpiry } from '$lib/server/auth/tokens';
import { nowIso } from '$lib/server/time';
import { listCustomers } from '$lib/server/settings/customers';
import { writeAudit } from '$lib/server/audit';
import { requireCustomer, UserInputError } from '$lib/server/users/users';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const db = getDb();
	const [tokens, customers, form] = await Promise.all([
		listApiTokens(db),
		listCustomers(db),
		superValidate({ scopes: ['dies:read'] }, zod4(tokenSchema), { errors: false })
	]);
	return { tokens, customers, form, now: nowIso() };
};

export const actions: Actions = {
	create: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(tokenSchema));
		if (!form.valid) return fail(400, { form });
		const db = getDb();
		if (form.data.customerId !== undefined) {
			try {
				await requireCustomer(db, form.data.customerId);
			} catch (err) {
				if (err instanceof UserInputError) return setError(form, 'customerId', err.message);
				throw err;
			}
		}
		const expiresAt = tokenExpiry(form.data.expiresOn, nowIso());
		if (expiresAt === 'invalid') {
			return setError(form, 'expiresOn', 'Give a real date after today and within five years.');
		}
		const { id, token } = await createApiToken(db, {
			name: form.data.name,
			scopes: form.data.scopes,
			customerId: form.data.customerId ?? null,
			createdBy: admin.id,
			expiresAt
		});
		await writeAudit(db, {
			userId: admin.id,
			action: 'token.create',
			detail: { id, name: form.data.name, expiresAt }
		});
		// The secret goes back once, in this response only.
		return message(form, token);
	},
	revoke: async (event) => {
		const admin = requireRole(event, 'admin');
		const data = await event.request.formData();
		const id = Number(data.get('id'));
		if (!Number.isInteger(id) || id <= 0) return fail(400, { revokeError: 'No token given.' });
		const db = getDb();
		// Revoking stops whatever uses the token at once (a press gateway stops counting): the
		// first press asks, the second (with confirm=1) revokes.
		if (data.get('confirm') !== '1') return { confirmRevoke: id };
		if (!(await revokeApiToken(db, id)))
			return fail(404, { revokeError: 'That token does not exist or is already revoked.' });
		await writeAudit(db, { userId: admin.id, action: 'token.revoke', detail: { id } });
		return { revoked: id };
	}
};
