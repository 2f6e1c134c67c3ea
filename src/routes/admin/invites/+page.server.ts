import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { env } from '$env/dynamic/private';
import { inviteSchema, type InviteOutcome } from '$lib/schemas/owner';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { readNoticeConfig } from '$lib/server/notices/config';
import { deliverInvitation, type InvitationMailConfig } from '$lib/server/owner/invitation-mail';
import {
	createInvitation,
	inviteDomainQuestion,
	listInvitations,
	renewInvitation,
	withdrawInvitation
} from '$lib/server/owner/invitations';
import { listCustomers } from '$lib/server/settings/customers';
import { mailFromFor, mailFooterFor, plantIdentity } from '$lib/server/settings/plant-identity';
import type { Actions, PageServerLoad } from './$types';

async function mailConfig(): Promise<InvitationMailConfig> {
	const notices = readNoticeConfig(env);
	const plant = await plantIdentity(getDb());
	return {
		smtpUrl: notices.smtpUrl,
		from: mailFromFor(plant, notices.from),
		origin: notices.origin,
		plantName: plant.name,
		footer: mailFooterFor(plant)
	};
}

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const db = getDb();
	const [customers, invitations, form] = await Promise.all([
		listCustomers(db),
		listInvitations(db),
		superValidate(zod4(inviteSchema), { errors: false })
	]);
	return { customers: customers.map((c) => ({ id: c.id, name: c.name })), invitations, form };
};

export const actions: Actions = {
	create: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(inviteSchema));
		if (!form.valid) return fail(400, { form });
		const db = getDb();
		const question = form.data.confirmDomain
			? null
			: await inviteDomainQuestion(db, form.data.customerId, form.data.email);
		if (question) return setError(form, 'confirmDomain', question, { status: 409 });
		const created = await createInvitation(db, {
			customerId: form.data.customerId,
			name: form.data.name,
			email: form.data.email,
			invitedBy: admin.id
		});
		if (!created.ok) return setError(form, created.field, created.message);
		const delivery = await deliverInvitation(
			db,
			{ ...created, name: form.data.name },
			await mailConfig()
		);
		const outcome: InviteOutcome = {
			email: created.email,
			link: delivery.link,
			sent: delivery.sent,
			error: delivery.sent ? undefined : delivery.error,
			replaced: created.replaced
		};
		return message(form, outcome);
	},
	renew: async (event) => {
		const admin = requireRole(event, 'admin');
		const id = Number((await event.request.formData()).get('id'));
		if (!Number.isInteger(id) || id <= 0) return fail(400, { listError: 'No invitation given.' });
		const db = getDb();
		const renewed = await renewInvitation(db, id, admin.id);
		if (!renewed.ok) return fail(404, { listError: renewed.message });
		const delivery = await deliverInvitation(db, renewed, await mailConfig());
		const outcome: InviteOutcome = {
			email: renewed.email,
			link: delivery.link,
			sent: delivery.sent,
			error: delivery.sent ? undefined : delivery.error
		};
		return { renewed: outcome };
	},
	withdraw: async (event) => {
		const admin = requireRole(event, 'admin');
		const id = Number((await event.request.formData()).get('id'));
		if (!Number.isInteger(id) || id <= 0) return fail(400, { listError: 'No invitation given.' });
		if (!(await withdrawInvitation(getDb(), id, admin.id))) {
			return fail(404, { listError: 'That invitation is already used, withdrawn or gone.' });
		}
		return { withdrawn: id };
	}
};
