// Issue 14, items 8, 9, 16, 17 and 18: account and token safeguards on the server functions.
import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { newUserSchema, tokenSchema } from '../../src/lib/schemas/auth';
import { checkPassword } from '../../src/lib/server/auth/sign-in';
import { passwordWeakness } from '../../src/lib/server/auth/password-strength';
import { createApiToken, findActiveToken, tokenExpiry } from '../../src/lib/server/auth/tokens';
import {
	createUser,
	getUserById,
	requireCustomer,
	setUserPassword,
	updateUserRole,
	UserInputError
} from '../../src/lib/server/users/users';
import { createKyselyAdapter } from '../../src/lib/server/auth/lucia';

let db: DB;
beforeEach(async () => {
	db = await openTestDatabase();
	await db.insertInto('customers').values({ code: 'ACME', name: 'Acme Pumps' }).execute();
});

const base = { email: 'n@plant.test', name: 'New Person', customerId: undefined, password: 'x' };

describe('item 16: a new account starts with the least role; admin must be confirmed', () => {
	test('an empty role field means Toolmaker, not Plant admin', () => {
		const parsed = newUserSchema.safeParse({ ...base, password: 'long enough pass' });
		expect(parsed.success && parsed.data.role).toBe('toolmaker');
	});
	test('admin without the confirmation is refused on the confirmAdmin field; with it, accepted', () => {
		const refused = newUserSchema.safeParse({
			...base,
			password: 'long enough pass',
			role: 'admin'
		});
		expect(refused.success).toBe(false);
		expect(refused.error?.issues[0].path).toEqual(['confirmAdmin']);
		const ok = newUserSchema.safeParse({
			...base,
			password: 'long enough pass',
			role: 'admin',
			confirmAdmin: true
		});
		expect(ok.success).toBe(true);
	});
});

describe('item 9: an unknown customer id is a field message, not a 500', () => {
	test('createUser and updateUserRole refuse customer 999 on the customerId field', async () => {
		const attempt = createUser(db, {
			email: 'c@x.test',
			name: 'C',
			role: 'customer',
			customerId: 999,
			password: 'long enough pass'
		});
		await expect(attempt).rejects.toThrow(UserInputError);
		await expect(attempt).rejects.toMatchObject({ field: 'customerId' });
		const id = await createUser(db, {
			email: 'd@x.test',
			name: 'D',
			role: 'toolmaker',
			customerId: null,
			password: 'long enough pass'
		});
		await expect(updateUserRole(db, id, 'customer', 999, id)).rejects.toMatchObject({
			field: 'customerId'
		});
		await expect(requireCustomer(db, 999)).rejects.toThrow(/no such customer/);
		await expect(requireCustomer(db, 1)).resolves.toBeUndefined();
	});
});

describe('item 17: a password set by an admin must be changed', () => {
	test('admin-made and admin-reset passwords are marked; the user’s own change clears the mark', async () => {
		const adminId = await createUser(db, {
			email: 'admin@x.test',
			name: 'Admin',
			role: 'admin',
			customerId: null,
			password: 'anvil meadow copper lantern'
		});
		const id = await createUser(
			db,
			{
				email: 'e@x.test',
				name: 'E',
				role: 'scheduler',
				customerId: null,
				password: 'first pass from admin',
				mustChangePassword: true
			},
			adminId
		);
		expect((await getUserById(db, id))?.must_change_password).toBe(1);
		await setUserPassword(db, id, 'my own new phrase here', id);
		expect((await getUserById(db, id))?.must_change_password).toBe(0);
		await setUserPassword(db, id, 'reset by the admin now', adminId);
		expect((await getUserById(db, id))?.must_change_password).toBe(1);
		// The session's user carries the mark (what requireRole reads).
		const adapter = createKyselyAdapter(db);
		await adapter.setSession({
			id: 's1',
			userId: id,
			expiresAt: new Date(Date.now() + 3_600_000),
			attributes: {}
		});
		const [, user] = await adapter.getSessionAndUser('s1');
		expect(user?.attributes.must_change_password).toBe(1);
	});
});

describe('item 8: weak passwords and the current-password check', () => {
	test('the estimator refuses "aaaaaaaaaa" with the reason, and accepts a phrase', () => {
		expect(passwordWeakness('aaaaaaaaaa')).toMatch(/repeats the same characters/);
		expect(passwordWeakness('qwertyuiop')).toMatch(/too easy to guess/);
		expect(passwordWeakness('anvil meadow copper lantern')).toBeNull();
	});
	test('the current-password check is throttled like sign-in: the sixth wrong try is refused', async () => {
		await createUser(db, {
			email: 'f@x.test',
			name: 'F',
			role: 'scheduler',
			customerId: null,
			password: 'anvil meadow copper lantern'
		});
		for (let i = 0; i < 5; i++) {
			expect((await checkPassword(db, 'f@x.test', 'guess', '10.0.0.9')).kind).toBe('wrong');
		}
		const sixth = await checkPassword(db, 'f@x.test', 'anvil meadow copper lantern', '10.0.0.9');
		expect(sixth.kind).toBe('blocked');
	});
});

describe('item 18: token expiry', () => {
	const now = '2026-12-03T10:00:00.000Z';
	test('the last day given works to its end (UTC); past, today, impossible and far dates are refused', () => {
		expect(tokenExpiry('', now)).toBeNull();
		expect(tokenExpiry('2026-12-04', now)).toBe('2026-12-05T00:00:00.000Z');
		expect(tokenExpiry('2026-12-03', now)).toBe('invalid');
		expect(tokenExpiry('2026-11-30', now)).toBe('invalid');
		expect(tokenExpiry('2027-02-30', now)).toBe('invalid');
		expect(tokenExpiry('2031-12-04', now)).toBe('invalid');
		expect(tokenExpiry('2031-12-03', now)).toBe('2031-12-04T00:00:00.000Z');
		expect(
			tokenSchema.safeParse({ name: 'MES', scopes: ['dies:read'], expiresOn: '3.12.2027' }).success
		).toBe(false);
	});
	test('an expired token is refused; one without expiry keeps working', async () => {
		const expired = await createApiToken(db, {
			name: 'old',
			scopes: ['dies:read'],
			customerId: null,
			createdBy: null,
			expiresAt: '2020-01-01T00:00:00.000Z'
		});
		const live = await createApiToken(db, {
			name: 'live',
			scopes: ['dies:read'],
			customerId: null,
			createdBy: null,
			expiresAt: '2999-01-01T00:00:00.000Z'
		});
		const forever = await createApiToken(db, {
			name: 'forever',
			scopes: ['dies:read'],
			customerId: null,
			createdBy: null
		});
		expect(await findActiveToken(db, expired.token)).toBeNull();
		expect(await findActiveToken(db, live.token)).not.toBeNull();
		expect(await findActiveToken(db, forever.token)).not.toBeNull();
	});
});
