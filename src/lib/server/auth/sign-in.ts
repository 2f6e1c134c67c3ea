import type { DB } from '../db/connect';
import { findUserByEmail } from '../users/users';
import { dummyPasswordHash, verifyPassword } from './password';
import { releaseSignInAttempt, reserveSignInAttempt } from './throttle';

export type PasswordCheck =
	| { kind: 'blocked'; waitMinutes: number }
	| { kind: 'wrong' }
	| { kind: 'ok'; user: NonNullable<Awaited<ReturnType<typeof findUserByEmail>>> };

/**
 * The one password check for sign-in and for "current password" on the account page. The attempt
 * is reserved against the account's and the address's allowance before argon2 runs, so parallel
 * guesses cannot overtake the limit; a right password hands the reservation back.
 */
export async function checkPassword(
	db: DB,
	email: string,
	password: string,
	address: string,
	now = Date.now()
): Promise<PasswordCheck> {
	const waitMinutes = await reserveSignInAttempt(db, email, address, now);
	if (waitMinutes > 0) return { kind: 'blocked', waitMinutes };
	const user = await findUserByEmail(db, email);
	const ok = user
		? await verifyPassword(user.password_hash, password)
		: (await verifyPassword(await dummyPasswordHash(), password)) && false;
	if (!user || !ok || !user.active) return { kind: 'wrong' };
	await releaseSignInAttempt(db, email, address);
	return { kind: 'ok', user };
}

export function tooManyAttemptsMessage(waitMinutes: number): string {
	return `Too many failed sign-ins. Try again in ${waitMinutes} minute${waitMinutes === 1 ? '' : 's'}, or ask your plant admin to reset your password.`;
}
