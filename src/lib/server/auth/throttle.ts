import type { DB } from '../db/connect';

// Failed sign-ins are counted per account and per client address in a fixed window. Stored in
// SQLite so the limit holds across restarts and several server processes.
export const THROTTLE_WINDOW_MS = 15 * 60 * 1000;
export const MAX_FAILURES_PER_ACCOUNT = 5;
export const MAX_FAILURES_PER_ADDRESS = 20;

const accountBucket = (email: string) => `account:${email.trim().toLowerCase()}`;
const addressBucket = (address: string) => `address:${address}`;

async function failuresIn(db: DB, bucket: string, now: number): Promise<number> {
	const row = await db
		.selectFrom('sign_in_failures')
		.selectAll()
		.where('bucket', '=', bucket)
		.executeTakeFirst();
	if (!row || now - row.window_started_at > THROTTLE_WINDOW_MS) return 0;
	return row.failures;
}

/** Minutes until the caller may try again, or 0 when a sign-in attempt may go ahead. */
export async function signInBlockedFor(
	db: DB,
	email: string,
	address: string,
	now = Date.now()
): Promise<number> {
	const checks: [string, number][] = [
		[accountBucket(email), MAX_FAILURES_PER_ACCOUNT],
		[addressBucket(address), MAX_FAILURES_PER_ADDRESS]
	];
	for (const [bucket, limit] of checks) {
		if ((await failuresIn(db, bucket, now)) >= limit) {
			const row = await db
				.selectFrom('sign_in_failures')
				.select('window_started_at')
				.where('bucket', '=', bucket)
				.executeTakeFirstOrThrow();
			return Math.max(1, Math.ceil((row.window_started_at + THROTTLE_WINDOW_MS - now) / 60000));
		}
	}
	return 0;
}

export async function recordSignInFailure(
	db: DB,
	email: string,
	address: string,
	now = Date.now()
) {
	for (const bucket of [accountBucket(email), addressBucket(address)]) {
		const current = await failuresIn(db, bucket, now);
		await db
			.insertInto('sign_in_failures')
			.values({ bucket, failures: 1, window_started_at: now })
			.onConflict((oc) =>
				oc
					.column('bucket')
					.doUpdateSet(
						current === 0 ? { failures: 1, window_started_at: now } : { failures: current + 1 }
					)
			)
			.execute();
	}
}

export async function clearAccountFailures(db: DB, email: string) {
	await db.deleteFrom('sign_in_failures').where('bucket', '=', accountBucket(email)).execute();
}
