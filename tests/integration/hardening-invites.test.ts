// Issue 14, item 20: inviting a customer user from an unknown e-mail domain is confirmed first.
import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { inviteSchema } from '../../src/lib/schemas/owner';
import { inviteDomainQuestion, knownCustomerDomains } from '../../src/lib/server/owner/invitations';

let db: DB;
beforeEach(async () => {
	db = await openTestDatabase();
	await db
		.insertInto('customers')
		.values([
			{ code: 'ACME', name: 'Acme Pumps', contact_email: 'Buying@Acme.test' },
			{ code: 'NEW', name: 'New Co', contact_email: null }
		])
		.execute();
	await db
		.insertInto('users')
		.values({
			id: 'u1',
			email: 'ops@acme-group.test',
			name: 'Ops',
			role: 'customer',
			customer_id: 1,
			password_hash: 'x'
		})
		.execute();
});

describe('item 20: invitation e-mail domains', () => {
	test('known domains: the contact address and the portal users, lower-cased', async () => {
		expect(await knownCustomerDomains(db, 1)).toEqual(['acme-group.test', 'acme.test']);
		expect(await knownCustomerDomains(db, 2)).toEqual([]);
	});

	test('a known domain passes; another domain gets a question naming the known ones', async () => {
		expect(await inviteDomainQuestion(db, 1, 'bea@acme.test')).toBeNull();
		expect(await inviteDomainQuestion(db, 1, 'cy@acme-group.test')).toBeNull();
		expect(await inviteDomainQuestion(db, 1, 'bea@acme.example')).toBe(
			"acme.example is not among this customer's known e-mail domains (acme-group.test, acme.test). Check the address; tick the box and send again if it is right."
		);
		// A customer with no known domain yet: nothing to compare with, no question.
		expect(await inviteDomainQuestion(db, 2, 'first@new.test')).toBeNull();
	});

	test('the form carries the confirmation, off unless ticked', () => {
		const base = { customerId: '1', name: 'Bea', email: 'bea@acme.example' };
		expect(inviteSchema.parse(base).confirmDomain).toBe(false);
		expect(inviteSchema.parse({ ...base, confirmDomain: true }).confirmDomain).toBe(true);
	});
});
