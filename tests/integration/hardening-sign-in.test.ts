// Issue 14, items 1 and 2: the sign-in throttle holds under parallel attempts, and the target
// after sign-in never leaves the origin.
import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import {
	MAX_FAILURES_PER_ACCOUNT,
	MAX_FAILURES_PER_ADDRESS,
	reserveSignInAttempt
} from '../../src/lib/server/auth/throttle';
import { checkPassword } from '../../src/lib/server/auth/sign-in';
import { safeRedirectTarget } from '../../src/lib/server/auth/redirect';
import { createUser } from '../../src/lib/server/users/users';

let db: DB;
beforeEach(async () => {
	db = await openTestDatabase();
	await createUser(db, {
		email: 'race@plant.test',
		name: 'Race',
		role: 'scheduler',
		customerId: null,
		password: 'Right-horse-battery-42'
	});
});

describe('item 1: the throttle is reserved before the verify', () => {
	test('30 parallel sign-ins (29 wrong, 1 right): at most 5 are verified, the rest are refused', async () => {
		const attempts = Array.from({ length: 30 }, (_, i) =>
			checkPassword(
				db,
				'race@plant.test',
				i === 29 ? 'Right-horse-battery-42' : `wrong-${i}`,
				'10.1.1.1'
			)
		);
		const results = await Promise.all(attempts);
		const verified = results.filter((r) => r.kind !== 'blocked').length;
		// The limit is 5 per account (MAX_FAILURES_PER_ACCOUNT); 30 - 5 = 25 refused unverified.
		expect(MAX_FAILURES_PER_ACCOUNT).toBe(5);
		expect(verified).toBe(5);
		expect(results.filter((r) => r.kind === 'blocked')).toHaveLength(25);
		// The right password was the 30th to arrive, so it never got to the verify.
		expect(results[29].kind).toBe('blocked');
		const row = await db
			.selectFrom('sign_in_failures')
			.selectAll()
			.where('bucket', '=', 'account:race@plant.test')
			.executeTakeFirstOrThrow();
		expect(row.failures).toBe(5);
	});

	test('reservations per address stop at 20 across many accounts at once', async () => {
		const results = await Promise.all(
			Array.from({ length: 40 }, (_, i) => reserveSignInAttempt(db, `u${i}@plant.test`, '10.2.2.2'))
		);
		expect(MAX_FAILURES_PER_ADDRESS).toBe(20);
		expect(results.filter((m) => m === 0)).toHaveLength(20);
		expect(results.filter((m) => m === 15)).toHaveLength(20);
	});

	test('a right password hands the attempt back, so signing in daily never locks an account', async () => {
		for (let i = 0; i < 8; i++) {
			const r = await checkPassword(db, 'race@plant.test', 'Right-horse-battery-42', '10.1.1.2');
			expect(r.kind).toBe('ok');
		}
		const rows = await db.selectFrom('sign_in_failures').selectAll().execute();
		expect(rows.filter((r) => r.failures > 0)).toEqual([]);
	});

	test('four wrong, then right, then five wrong: the sixth wrong is refused before the verify', async () => {
		for (let i = 0; i < 4; i++)
			expect((await checkPassword(db, 'race@plant.test', 'x', '10.1.1.3')).kind).toBe('wrong');
		expect(
			(await checkPassword(db, 'race@plant.test', 'Right-horse-battery-42', '10.1.1.3')).kind
		).toBe('ok');
		for (let i = 0; i < 5; i++)
			expect((await checkPassword(db, 'race@plant.test', 'x', '10.1.1.3')).kind).toBe('wrong');
		const sixth = await checkPassword(db, 'race@plant.test', 'Right-horse-battery-42', '10.1.1.3');
		expect(sixth).toEqual({ kind: 'blocked', waitMinutes: 15 });
	});
});

describe('item 2: the target after sign-in stays on the origin', () => {
	const origin = 'https://castellan.plant.test';
	test.each([
		['/%5Cevil.example decoded', '/\\evil.example'],
		['/%09/evil.example decoded (tab)', '/\t/evil.example'],
		['newline', '/\n/evil.example'],
		['carriage return', '/\r/evil.example'],
		['protocol-relative', '//evil.example/x'],
		['backslash pair', '/\\\\evil.example'],
		['absolute URL', 'https://evil.example/'],
		['javascript scheme', 'javascript:alert(1)'],
		['no leading slash', 'evil.example'],
		['DEL character', '/\u007f/evil.example'],
		['empty', '']
	])('%s is refused', (_name, target) => {
		expect(safeRedirectTarget(target, origin)).toBeNull();
	});

	test('a same-origin path with its query and hash is kept', () => {
		expect(safeRedirectTarget('/dies/D-0101?tab=plan#next', origin)).toBe(
			'/dies/D-0101?tab=plan#next'
		);
		expect(safeRedirectTarget('/dies/../admin/users', origin)).toBe('/admin/users');
		expect(safeRedirectTarget(null, origin)).toBeNull();
	});
});
