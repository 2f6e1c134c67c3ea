import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { newUserSchema, resetPasswordSchema } from '$lib/schemas/auth';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { passwordWeakness } from '$lib/server/auth/password-strength';
import { listCustomers } from '$lib/server/settings/customers';
import {
	createUser,
	listUsers,
	setUserActive,
	setUserPassword,
	updateUserRole,
	UserInputError
} from '$lib/server/users/users';
import { ROLES } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

const roleChangeSchema = z.object({
	userId: z.string().min(1),
	role: z.enum(ROLES),
	customerId: z.preprocess(
		(v) => (v === '' ? undefined : v),
		z.coerce.number().int().positive().optional()
	)
});

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const db = getDb();
	const [users, customers, createForm, resetForm] = await Promise.all([
		listUsers(db),
		listCustomers(db),
		superValidate(zod4(newUserSchema)),
		superValidate(zod4(resetPasswordSchema))
	]);
	return { users, customers, createForm, resetForm };
};

export const actions: Actions = {
	create: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(newUserSchema));
		const password = form.data.password;
		form.data.password = '';
		if (!form.valid) return fail(400, { createForm: form });
		const weak = passwordWeakness(password, [form.data.email, form.data.name]);
		if (weak) return setError(form, 'password', weak);
		try {
			await createUser(
				getDb(),
				{
					...form.data,
					password,
					customerId: form.data.customerId ?? null,
					mustChangePassword: true
				},
				admin.id
			);
		} catch (err) {
			if (err instanceof UserInputError) return setError(form, err.field as 'email', err.message);
			throw err;
		}
		return message(form, `Account created for ${form.data.email}.`);
	},
	role: async (event) => {
		const admin = requireRole(event, 'admin');
		const parsed = roleChangeSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success)
			return fail(400, { rowError: 'Choose a role (and a customer for a tooling owner).' });
		if (parsed.data.userId === admin.id && parsed.data.role !== 'admin') {
			return fail(400, { rowError: 'You cannot take the admin role from yourself.' });
		}
		try {
			await updateUserRole(
				getDb(),
				parsed.data.userId,
				parsed.data.role,
				parsed.data.customerId ?? null,
				admin.id
			);
		} catch (err) {
			if (err instanceof UserInputError) return fail(400, { rowError: err.message });
			throw err;
		}
		return { rowMessage: 'Role changed; the user signs in again.' };
	},
	active: async (event) => {
		const admin = requireRole(event, 'admin');
		const data = await event.request.formData();
		const userId = String(data.get('userId') ?? '');
		const active = data.get('active') === '1';
		if (!userId) return fail(400, { rowError: 'No user given.' });
		if (userId === admin.id && !active)
			return fail(400, { rowError: 'You cannot disable your own account.' });
		await setUserActive(getDb(), userId, active, admin.id);
		return { rowMessage: active ? 'Account enabled.' : 'Account disabled; its sessions ended.' };
	},
	reset: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(resetPasswordSchema));
		const password = form.data.password;
		form.data.password = '';
		if (!form.valid) return fail(400, { resetForm: form });
		const weak = passwordWeakness(password);
		if (weak) return setError(form, 'password', weak);
		await setUserPassword(getDb(), form.data.userId, password, admin.id);
		return message(form, 'Password reset; tell the user by a channel other than e-mail.');
	}
};
