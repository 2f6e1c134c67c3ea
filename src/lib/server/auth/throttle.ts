import { rawHandle, type DB } from '../db/connect';

// Sign-in attempts are counted per account and per client address in a fixed window (an attempt
// is reserved before the password is checked and handed back when it was right). Stored in
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

interface BucketRow {
	failures: number;
	window_started_at: number;
}

/**
 * Takes one sign-in attempt from the account's and the address's allowance before the password
 * is verified, in one IMMEDIATE transaction: however many requests arrive at once, at most the
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
	const raw = rawHandle(db);
	const checks: [string, number][] = [
		[accountBucket(email), MAX_FAILURES_PER_ACCOUNT],
		[addressBucket(address), MAX_FAILURES_PER_ADDRESS]
	];
	return db.connection().execute(async () => {
		const read = raw.prepare<[string], BucketRow>(
			'select failures, window_started_at from sign_in_failures where bucket = ?'
		);
		const write = raw.prepare(
			`insert into sign_in_failures (bucket, failures, window_started_at) values (?, ?, ?)
			 on conflict (bucket) do update set failures = excluded.failures,
			 window_started_at = excluded.window_started_at`
		);
		const reserve = raw.transaction((): number => {
			const rows = checks.map(([bucket, limit]) => {
				const row = read.get(bucket);
				const live = row && now - row.window_started_at <= THROTTLE_WINDOW_MS ? row : null;
				return { bucket, limit, live };
			});
			for (const { limit, live } of rows) {
				if (live && live.failures >= limit) {
					return Math.max(
						1,
						Math.ceil((live.window_started_at + THROTTLE_WINDOW_MS - now) / 60000)
					);
				}
			}
			for (const { bucket, live } of rows) {
				if (live) write.run(bucket, live.failures + 1, live.window_started_at);
				else write.run(bucket, 1, now);
			}
			return 0;
		});
		return reserve.immediate();
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
