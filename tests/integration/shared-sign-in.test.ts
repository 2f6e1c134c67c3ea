// Several app processes on one plant database (issue 17): a session made by one is good on the
// other, signing out on one ends it on both, and the sign-in throttle counts the attempts of all
// of them together. Two handles stand for two processes: on SQLite two connections to one file,
// on the PostgreSQL pass two pools on one schema.
import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import {
	openSharedTestDatabase,
	reopenDatabase,
	testEngine,
	type DB
} from '../../src/lib/server/db/connect';
import { createLucia } from '../../src/lib/server/auth/lucia';
import { checkPassword } from '../../src/lib/server/auth/sign-in';
import { MAX_FAILURES_PER_ACCOUNT, THROTTLE_WINDOW_MS } from '../../src/lib/server/auth/throttle';
import { createUser, setUserActive } from '../../src/lib/server/users/users';

let one: DB;
let two: DB;
let userId: string;
const PASSWORD = 'Right-horse-battery-42';

beforeEach(async () => {
	one = await openSharedTestDatabase();
	two = reopenDatabase(one);
	userId = await createUser(one, {
		email: 'shared@plant.test',
		name: 'Shared',
		role: 'toolmaker',
		customerId: null,
		password: PASSWORD
	});
});
afterEach(async () => {
	await two.destroy();
	await one.destroy();
});

describe(`one database, two app processes (${testEngine()})`, () => {
	test('a session made on one process is valid on the other, and signing out ends it on both', async () => {
		const luciaOne = createLucia(one, true);
		const luciaTwo = createLucia(two, true);
		const session = await luciaOne.createSession(userId, {});
		const seen = await luciaTwo.validateSession(session.id);
		expect(seen.user?.id).toBe(userId);
		expect(seen.user?.role).toBe('toolmaker');
		expect(seen.user?.active).toBe(true);
		// Lucia's 12 h sessions: the expiry is the same instant on both sides, to the millisecond.
		expect(seen.session?.expiresAt.getTime()).toBe(session.expiresAt.getTime());
		await luciaTwo.invalidateSession(session.id);
		expect((await luciaOne.validateSession(session.id)).session).toBeNull();
	});

	test('disabling the user on one process ends the sessions the other made', async () => {
		const session = await createLucia(two, true).createSession(userId, {});
		await setUserActive(one, userId, false, userId);
		expect((await createLucia(two, true).validateSession(session.id)).session).toBeNull();
	});

	test('wrong passwords sent to both processes at once: 5 get to the verify in all, not 5 each', async () => {
		const now = Date.parse('2026-12-05T08:00:00Z');
		const results = await Promise.all(
			Array.from({ length: 16 }, (_, i) =>
				checkPassword(i % 2 ? two : one, 'shared@plant.test', `wrong-${i}`, `10.3.3.${i}`, now)
			)
		);
		expect(MAX_FAILURES_PER_ACCOUNT).toBe(5);
		// 16 attempts from 16 addresses: the account's 5 are taken, the other 11 wait.
		expect(results.filter((r) => r.kind === 'wrong')).toHaveLength(5);
		const blocked = results.filter((r) => r.kind === 'blocked');
		expect(blocked).toHaveLength(11);
		// The window began at `now`: 15 minutes to wait on either process.
		expect(THROTTLE_WINDOW_MS).toBe(15 * 60_000);
		for (const b of blocked) expect(b).toEqual({ kind: 'blocked', waitMinutes: 15 });
		// Even the right password is refused on the other process until the window is over.
		expect(await checkPassword(two, 'shared@plant.test', PASSWORD, '10.3.4.1', now)).toEqual({
			kind: 'blocked',
			waitMinutes: 15
		});
		const after = now + THROTTLE_WINDOW_MS + 1;
		expect((await checkPassword(one, 'shared@plant.test', PASSWORD, '10.3.4.1', after)).kind).toBe(
			'ok'
		);
	});
});
