import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { createKyselyAdapter } from '../../src/lib/server/auth/lucia';
import { hashPassword, verifyPassword } from '../../src/lib/server/auth/password';
import {
	MAX_FAILURES_PER_ACCOUNT,
	MAX_FAILURES_PER_ADDRESS,
	THROTTLE_WINDOW_MS,
	clearAccountFailures,
	recordSignInFailure,
	signInBlockedFor
} from '../../src/lib/server/auth/throttle';
import { createApiToken, findActiveToken, revokeApiToken } from '../../src/lib/server/auth/tokens';
import { createUser, setUserActive, UserInputError } from '../../src/lib/server/users/users';

let db: DB;
beforeEach(async () => {
	db = await openTestDatabase();
	await db
		.insertInto('customers')
		.values([{ code: 'ACME', name: 'Acme Pumps' }])
		.execute();
});

describe('passwords (argon2id, OWASP minimum parameters)', () => {
	test('the stored hash is argon2id with m=19456 KiB, t=2, p=1 and verifies only the right password', async () => {
		const hash = await hashPassword('correct horse battery');
		expect(hash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
		expect(await verifyPassword(hash, 'correct horse battery')).toBe(true);
		expect(await verifyPassword(hash, 'correct horse batterY')).toBe(false);
		expect(await verifyPassword('not-a-hash', 'x')).toBe(false);
	});
});

describe('users', () => {
	test('a customer account must name its customer; emails are unique regardless of case', async () => {
		await expect(
			createUser(db, {
				email: 'b@acme.test',
				name: 'B',
				role: 'customer',
				customerId: null,
				password: 'long-enough-1'
			})
		).rejects.toThrow(UserInputError);
		await createUser(db, {
			email: 'A@Plant.test',
			name: 'A',
			role: 'admin',
			customerId: null,
			password: 'long-enough-1'
		});
		await expect(
			createUser(db, {
				email: 'a@plant.test',
				name: 'A2',
				role: 'scheduler',
				customerId: null,
				password: 'long-enough-1'
			})
		).rejects.toThrow(/already an account/);
		const rows = await db.selectFrom('users').select(['email', 'customer_id']).execute();
		expect(rows).toEqual([{ email: 'a@plant.test', customer_id: null }]);
	});

	test('the database refuses a plant role bound to a customer', async () => {
		await expect(
			db
				.insertInto('users')
				.values({
					id: 'x',
					email: 'x@y.test',
					name: 'X',
					role: 'admin',
					customer_id: 1,
					password_hash: 'h'
				})
				.execute()
		).rejects.toThrow(/CHECK constraint/);
	});

	test('disabling a user ends the sessions at once', async () => {
		const id = await createUser(db, {
			email: 't@plant.test',
			name: 'T',
			role: 'toolmaker',
			customerId: null,
			password: 'long-enough-1'
		});
		const adapter = createKyselyAdapter(db);
		await adapter.setSession({
			id: 's1',
			userId: id,
			expiresAt: new Date(Date.now() + 3_600_000),
			attributes: {}
		});
		expect((await adapter.getSessionAndUser('s1'))[1]?.attributes.role).toBe('toolmaker');
		await setUserActive(db, id, false, id);
		expect(await adapter.getSessionAndUser('s1')).toEqual([null, null]);
	});
});

describe('sign-in throttling', () => {
	const now = Date.parse('2026-12-01T10:00:00Z');
	test(`an account is locked after ${MAX_FAILURES_PER_ACCOUNT} failures and frees up after the window`, async () => {
		for (let i = 0; i < MAX_FAILURES_PER_ACCOUNT - 1; i++)
			await recordSignInFailure(db, 'u@plant.test', '10.0.0.1', now);
		expect(await signInBlockedFor(db, 'u@plant.test', '10.0.0.1', now)).toBe(0);
		await recordSignInFailure(db, 'U@plant.test', '10.0.0.2', now);
		expect(await signInBlockedFor(db, 'u@plant.test', '10.0.0.3', now)).toBe(15);
		expect(await signInBlockedFor(db, 'other@plant.test', '10.0.0.3', now)).toBe(0);
		expect(
			await signInBlockedFor(db, 'u@plant.test', '10.0.0.3', now + THROTTLE_WINDOW_MS + 1)
		).toBe(0);
	});

	test(`an address is locked after ${MAX_FAILURES_PER_ADDRESS} failures across accounts`, async () => {
		for (let i = 0; i < MAX_FAILURES_PER_ADDRESS; i++)
			await recordSignInFailure(db, `u${i}@plant.test`, '10.9.9.9', now);
		expect(await signInBlockedFor(db, 'fresh@plant.test', '10.9.9.9', now)).toBeGreaterThan(0);
		expect(await signInBlockedFor(db, 'fresh@plant.test', '10.9.9.8', now)).toBe(0);
	});

	test('a successful sign-in clears the account counter', async () => {
		for (let i = 0; i < 4; i++) await recordSignInFailure(db, 'u@plant.test', '10.0.0.1', now);
		await clearAccountFailures(db, 'u@plant.test');
		await recordSignInFailure(db, 'u@plant.test', '10.0.0.1', now);
		expect(await signInBlockedFor(db, 'u@plant.test', '10.0.0.1', now)).toBe(0);
	});
});

describe('API tokens', () => {
	test('only the hash is stored; revoked or unknown tokens are refused; scopes and binding come back', async () => {
		const { id, token } = await createApiToken(db, {
			name: 'MES',
			scopes: ['dies:read'],
			customerId: 1,
			createdBy: null
		});
		const row = await db
			.selectFrom('api_tokens')
			.selectAll()
			.where('id', '=', id)
			.executeTakeFirstOrThrow();
		expect(row.token_hash).not.toContain(token);
		expect(JSON.stringify(row)).not.toContain(token);
		expect(await findActiveToken(db, token)).toMatchObject({
			scopes: ['dies:read'],
			customerId: 1
		});
		expect(await findActiveToken(db, token + 'x')).toBeNull();
		expect(await revokeApiToken(db, id)).toBe(true);
		expect(await revokeApiToken(db, id)).toBe(false);
		expect(await findActiveToken(db, token)).toBeNull();
	});

	test('a token needs a known scope', async () => {
		await expect(
			createApiToken(db, { name: 'x', scopes: [], customerId: null, createdBy: null })
		).rejects.toThrow(/scope/);
	});
});
