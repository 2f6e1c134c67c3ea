import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { verifyPassword } from '../../src/lib/server/auth/password';
import {
	acceptInvitation,
	createInvitation,
	findInvitationByToken,
	hashInviteToken,
	listInvitations,
	renewInvitation,
	withdrawInvitation
} from '../../src/lib/server/owner/invitations';
import { deliverInvitation } from '../../src/lib/server/owner/invitation-mail';
import { startFakeMail, type FakeMail } from '../../fakes/mail/server';

const NOW = '2026-06-30T12:00:00.000Z';
const HOUR = 3_600_000;
const later = (hours: number) => new Date(Date.parse(NOW) + hours * HOUR).toISOString();

let db: DB;
let acme: number;
const ADMIN = 'admin-1';

beforeEach(async () => {
	db = await openTestDatabase();
	const c = await db
		.insertInto('customers')
		.values({ code: 'ACME', name: 'Acme Pumps' })
		.returning('id')
		.executeTakeFirstOrThrow();
	acme = c.id;
	await db
		.insertInto('users')
		.values({
			id: ADMIN,
			email: 'admin@plant.test',
			name: 'Admin',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
});

async function invite(email = 'Buyer@Acme.test') {
	const r = await createInvitation(
		db,
		{ customerId: acme, name: 'Bea Buyer', email, invitedBy: ADMIN },
		NOW
	);
	if (!r.ok) throw new Error(r.message);
	return r;
}

describe('invitations', () => {
	test('only the hash of the link is stored; the link opens for 72 hours', async () => {
		const inv = await invite();
		expect(inv.email).toBe('buyer@acme.test');
		expect(inv.expiresAt).toBe(later(72));
		const row = await db.selectFrom('invitations').selectAll().executeTakeFirstOrThrow();
		expect(row.token_hash).toBe(hashInviteToken(inv.token));
		expect(JSON.stringify(row)).not.toContain(inv.token);
		expect(await findInvitationByToken(db, inv.token, later(71))).toMatchObject({
			state: 'open',
			name: 'Bea Buyer',
			customerName: 'Acme Pumps'
		});
		// Past expiry nothing about the invitation is shown, only the state.
		expect(await findInvitationByToken(db, inv.token, later(72))).toEqual({ state: 'expired' });
		expect(await findInvitationByToken(db, 'nope', NOW)).toBeUndefined();
	});

	test('the link creates a customer user bound to the customer, once', async () => {
		const inv = await invite();
		const result = await acceptInvitation(db, inv.token, 'a long enough password', later(1));
		expect(result.ok).toBe(true);
		const user = await db
			.selectFrom('users')
			.selectAll()
			.where('email', '=', 'buyer@acme.test')
			.executeTakeFirstOrThrow();
		expect(user).toMatchObject({ role: 'customer', customer_id: acme, name: 'Bea Buyer' });
		expect(await verifyPassword(user.password_hash, 'a long enough password')).toBe(true);

		const again = await acceptInvitation(db, inv.token, 'another password!!', later(2));
		expect(again).toMatchObject({ ok: false, reason: 'used' });
		expect(await db.selectFrom('users').select('id').execute()).toHaveLength(2);
		expect((await listInvitations(db, later(2)))[0]).toMatchObject({ state: 'used' });
	});

	test('expired, withdrawn and unknown links create nothing and say why', async () => {
		const inv = await invite();
		expect(
			await acceptInvitation(db, inv.token, 'a long enough password', later(73))
		).toMatchObject({
			ok: false,
			reason: 'expired',
			message: expect.stringMatching(/expired/)
		});
		const second = await invite('other@acme.test');
		expect(await withdrawInvitation(db, second.id, ADMIN, later(1))).toBe(true);
		expect(await withdrawInvitation(db, second.id, ADMIN, later(1))).toBe(false);
		expect(
			await acceptInvitation(db, second.token, 'a long enough password', later(2))
		).toMatchObject({
			ok: false,
			reason: 'withdrawn'
		});
		expect(await acceptInvitation(db, 'made-up', 'a long enough password', NOW)).toMatchObject({
			ok: false,
			reason: 'unknown'
		});
		expect(await db.selectFrom('users').select('id').execute()).toHaveLength(1);
	});

	test('an address with an account cannot be invited; a new invitation replaces the open one', async () => {
		const taken = await createInvitation(
			db,
			{ customerId: acme, name: 'X', email: 'ADMIN@plant.test', invitedBy: ADMIN },
			NOW
		);
		expect(taken).toMatchObject({ ok: false, field: 'email' });
		const unknownCustomer = await createInvitation(
			db,
			{ customerId: 999, name: 'X', email: 'x@acme.test', invitedBy: ADMIN },
			NOW
		);
		expect(unknownCustomer).toMatchObject({ ok: false, field: 'customerId' });

		const first = await invite();
		const second = await invite();
		expect(second.replaced).toBe(1);
		expect(
			await acceptInvitation(db, first.token, 'a long enough password', later(1))
		).toMatchObject({
			ok: false,
			reason: 'withdrawn'
		});
		expect((await acceptInvitation(db, second.token, 'a long enough password', later(1))).ok).toBe(
			true
		);
	});

	test('a renewed invitation gets a new link and the old one stops working', async () => {
		const inv = await invite();
		const renewed = await renewInvitation(db, inv.id, ADMIN, later(80));
		if (!renewed.ok) throw new Error(renewed.message);
		expect(renewed.expiresAt).toBe(later(152));
		expect(
			await acceptInvitation(db, inv.token, 'a long enough password', later(81))
		).toMatchObject({
			ok: false,
			reason: 'unknown'
		});
		expect(
			(await acceptInvitation(db, renewed.token, 'a long enough password', later(81))).ok
		).toBe(true);
		expect(await renewInvitation(db, inv.id, ADMIN, later(82))).toMatchObject({ ok: false });
	});

	test('if the account appears meanwhile, the link says so and stays unused', async () => {
		const inv = await invite();
		await db
			.insertInto('users')
			.values({
				id: 'u2',
				email: 'buyer@acme.test',
				name: 'B',
				role: 'customer',
				customer_id: acme,
				password_hash: 'x'
			})
			.execute();
		expect(await acceptInvitation(db, inv.token, 'a long enough password', later(1))).toMatchObject(
			{
				ok: false,
				reason: 'account_exists'
			}
		);
		expect((await listInvitations(db, later(1)))[0].state).toBe('open');
	});
});

describe('invitation e-mail', () => {
	let mail: FakeMail;
	beforeAll(async () => {
		mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
	});
	afterAll(async () => {
		await mail.close();
	});

	test('goes through the relay with the one-time link, and the result is recorded', async () => {
		mail.clear();
		const inv = await invite();
		const delivery = await deliverInvitation(
			db,
			{ ...inv, name: 'Bea <Buyer>', customerName: 'Acme Pumps' },
			{
				smtpUrl: `smtp://127.0.0.1:${mail.smtpPort}`,
				from: 'Castellan <castellan@plant.test>',
				origin: 'https://castellan.plant.test/',
				plantName: 'Kestrel Test Works'
			}
		);
		expect(delivery).toMatchObject({
			sent: true,
			link: `https://castellan.plant.test/invite/${inv.token}`
		});
		const [message] = mail.messages();
		expect(message.to).toEqual(['buyer@acme.test']);
		expect(message.subject).toContain('Acme Pumps');
		expect(message.text).toContain(delivery.link);
		expect(message.html).toContain('Bea &lt;Buyer&gt;');
		expect(message.html).not.toContain('Bea <Buyer>');
		const row = await db.selectFrom('invitations').selectAll().executeTakeFirstOrThrow();
		expect(row).toMatchObject({ mail_state: 'sent', mail_error: null });
	});

	test('a relay that is down is recorded as failed with the reason', async () => {
		const inv = await invite();
		const delivery = await deliverInvitation(
			db,
			{ ...inv, name: 'Bea', customerName: 'Acme Pumps' },
			{
				smtpUrl: 'smtp://127.0.0.1:1',
				from: 'Castellan <castellan@plant.test>',
				origin: 'http://localhost:3000',
				plantName: 'Kestrel Test Works'
			}
		);
		expect(delivery.sent).toBe(false);
		const row = await db.selectFrom('invitations').selectAll().executeTakeFirstOrThrow();
		expect(row.mail_state).toBe('failed');
		expect(row.mail_error).toMatch(/could not be sent/);
	});
});
