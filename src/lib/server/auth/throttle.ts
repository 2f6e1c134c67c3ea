import type { DB } from '../db/connect';
import { inReadSession, inWriteTransaction, type SqlSession } from '../db/session';

// Sign-in attempts are counted per account and per client address in a fixed window (an attempt
// is reserved before the password is checked and handed back when it was right). Stored in the
// database so the limit holds across restarts and across every app process on one database.
export const THROTTLE_WINDOW_MS = 15 * 60 * 1000;
export const MAX_FAILURES_PER_ACCOUNT = 5;
export const MAX_FAILURES_PER_ADDRESS = 20;

const accountBucket = (email: string) => `account:${email.trim().toLowerCase()}`;
const addressBucket = (address: string) => `address:${address}`;

interface BucketRow {
	failures: number;
	window_started_at: number;
}

/** The bucket's count in the window that holds `now`, or null when its window is over. */
async function liveBucket(s: SqlSession, bucket: string, now: number): Promise<BucketRow | null> {
	const row = await s.get<BucketRow>(
		'select failures, window_started_at from sign_in_failures where bucket = ?',
		[bucket]
	);
	return row && now - row.window_started_at <= THROTTLE_WINDOW_MS ? row : null;
}

/** One more attempt in the bucket: counted in its live window, or the first of a new one. */
async function countAttempt(s: SqlSession, bucket: string, live: BucketRow | null, now: number) {
	await s.run(
		`insert into sign_in_failures (bucket, failures, window_started_at) values (?, ?, ?)
		 on conflict (bucket) do update set failures = excluded.failures,
		 window_started_at = excluded.window_started_at`,
		live ? [bucket, live.failures + 1, live.window_started_at] : [bucket, 1, now]
	);
}

const minutesLeft = (live: BucketRow, now: number) =>
	Math.max(1, Math.ceil((live.window_started_at + THROTTLE_WINDOW_MS - now) / 60000));

const bucketsFor = (email: string, address: string): [string, number][] => [
	[accountBucket(email), MAX_FAILURES_PER_ACCOUNT],
	[addressBucket(address), MAX_FAILURES_PER_ADDRESS]
];

/** Minutes until the caller may try again, or 0 when a sign-in attempt may go ahead. */
export async function signInBlockedFor(
	db: DB,
	email: string,
	address: string,
	now = Date.now()
): Promise<number> {
	return inReadSession(db, async (s) => {
		for (const [bucket, limit] of bucketsFor(email, address)) {
			const live = await liveBucket(s, bucket, now);
			if (live && live.failures >= limit) return minutesLeft(live, now);
		}
		return 0;
	});
}

/** Counts a failed attempt against the account and the address (no reservation before it). */
export async function recordSignInFailure(
	db: DB,
	email: string,
	address: string,
	now = Date.now()
) {
	await inWriteTransaction(db, { lock: 'throttle' }, async (s) => {
		for (const [bucket] of bucketsFor(email, address)) {
			await countAttempt(s, bucket, await liveBucket(s, bucket, now), now);
		}
	});
}

export async function clearAccountFailures(db: DB, email: string) {
	await db.deleteFrom('sign_in_failures').where('bucket', '=', accountBucket(email)).execute();
}

/**
 * Takes one sign-in attempt from the account's and the address's allowance before the password
 * is verified, in one write transaction under the throttle lock (SQLite: IMMEDIATE; PostgreSQL:
 * an advisory lock every app process shares): however many requests arrive at once, at most the
 * limit get past this point per account and per address in a window (the slow argon2 verify
 * runs only for them). Returns 0 when the attempt is reserved, else the minutes to wait.
 * A correct password hands the reservation back with `releaseSignInAttempt`.
 */
export async function reserveSignInAttempt(
	db: DB,
	email: string,
	address: string,
	now = Date.now()
): Promise<number> {
	return inWriteTransaction(db, { lock: 'throttle' }, async (s) => {
		const rows: { bucket: string; live: BucketRow | null }[] = [];
		for (const [bucket, limit] of bucketsFor(email, address)) {
			const live = await liveBucket(s, bucket, now);
			if (live && live.failures >= limit) return minutesLeft(live, now);
			rows.push({ bucket, live });
		}
		for (const { bucket, live } of rows) await countAttempt(s, bucket, live, now);
		return 0;
	});
}

/** After a correct password: the account starts afresh and the address gets its attempt back. */
export async function releaseSignInAttempt(db: DB, email: string, address: string) {
	await clearAccountFailures(db, email);
	await db
		.updateTable('sign_in_failures')
		.set((eb) => ({ failures: eb('failures', '-', 1) }))
		.where('bucket', '=', addressBucket(address))
		.where('failures', '>', 0)
		.execute();
}
