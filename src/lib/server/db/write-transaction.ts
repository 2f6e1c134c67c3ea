import { sql, type Transaction } from 'kysely';
import { engineOf, type DB } from './connect';
import type { Database } from './schema';
import { advisoryLockId, type WriteLock } from './session';

/**
 * Kysely's transaction with SQLite's one-writer-at-a-time meaning on both engines. On SQLite the
 * app's single connection already runs such transactions one after another. On PostgreSQL (READ
 * COMMITTED, many processes) a read-check-write — the next statement number of the day, "is this
 * window still unclaimed", "is the die still ready" — could interleave with another process's and
 * both would pass the check; the transaction therefore first takes a transaction-level advisory
 * lock (`registry` unless named), so such writes queue as they do on SQLite.
 *
 * Use it for every Kysely-built write transaction; the hot raw paths use `inWriteTransaction`.
 */
export async function writeTransaction<T>(
	db: DB,
	work: (trx: Transaction<Database>) => Promise<T>,
	lock: WriteLock = 'registry'
): Promise<T> {
	return db.transaction().execute(async (trx) => {
		if (engineOf(db) === 'postgres') {
			await sql`select pg_advisory_xact_lock(${advisoryLockId(lock)})`.execute(trx);
		}
		return work(trx);
	});
}
