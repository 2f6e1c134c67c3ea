import { hash, verify } from '@node-rs/argon2';

// argon2id with the OWASP Password Storage Cheat Sheet minimum: m = 19 MiB, t = 2, p = 1.
// @node-rs/argon2 defaults to argon2id (algorithm 2).
const ARGON2_OPTIONS = { memoryCost: 19456, timeCost: 2, parallelism: 1, outputLen: 32 } as const;

export function hashPassword(password: string): Promise<string> {
	return hash(password, ARGON2_OPTIONS);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
	try {
		return await verify(passwordHash, password);
	} catch {
		return false;
	}
}

/** A hash of a random password, verified against when the account does not exist so that
 * answering "no such user" takes as long as answering "wrong password". */
let dummyHash: Promise<string> | undefined;
export function dummyPasswordHash(): Promise<string> {
	dummyHash ??= hashPassword('castellan-timing-equaliser');
	return dummyHash;
}
