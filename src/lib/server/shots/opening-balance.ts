import type { DB } from '../db/connect';
import { inWriteTransaction, type SqlSession } from '../db/session';

export interface OpeningBalance {
	dieId: number;
	shots: number;
	/** When the balance is entered (the import); the entry is dated on it. */
	at: string;
	userId: string | null;
	note: string;
}

const SQL = {
	entries: 'select count(*) as n from shot_entries where die_id = ?',
	insert: `insert into shot_entries (die_id, machine_id, counted_at, shots, counter_start, counter_end,
	   source, idem_key, entered_by, token_id, note, created_at)
	 values (?, null, ?, ?, null, null, 'opening', null, ?, null, ?, ?)`,
	dieTotal: 'update dies set total_shots = total_shots + ?, updated_at = ? where id = ?',
	// A `case`, not two-argument max(): PostgreSQL has no scalar max.
	halves: `update die_halves set shots = shots + case when ? > die_shots_at_install
	     then ? - die_shots_at_install else 0 end
	  where die_id = ? and active = 1`
};

/**
 * Writes a die's opening balance — the shots it made before Castellan — as a ledger entry of
 * source 'opening', with the die total and its current halves' counts, in the caller's
 * transaction (the sibling of recordShots for a die that has just been registered).
 * The daily roll-up is left alone on purpose: it holds production per day, and years of shots
 * on the import day would make the trailing rate (and every projected due date) absurd; charts
 * built back from the kept total start at the opening count, as they should.
 * A current half gets the shots since it went in: opening minus the die count at its install.
 * "Last counted at" stays empty: an opening balance is no press reading, so the first real count
 * after it is not rate-checked against the import time.
 */
export async function writeOpeningBalance(s: SqlSession, entry: OpeningBalance): Promise<void> {
	if (!Number.isSafeInteger(entry.shots) || entry.shots < 0) {
		throw new Error(`An opening balance must be a whole number of shots, 0 or more.`);
	}
	if (entry.shots === 0) return;
	const has = await s.get<{ n: number }>(SQL.entries, [entry.dieId]);
	if (Number(has?.n) > 0) {
		throw new Error('A die that already has ledger entries takes no opening balance.');
	}
	await s.run(SQL.insert, [entry.dieId, entry.at, entry.shots, entry.userId, entry.note, entry.at]);
	await s.run(SQL.dieTotal, [entry.shots, entry.at, entry.dieId]);
	await s.run(SQL.halves, [entry.shots, entry.shots, entry.dieId]);
}

/** An opening balance on its own, in a ledger transaction of its own (the demo, tests). */
export function recordOpeningBalance(db: DB, entry: OpeningBalance): Promise<void> {
	return inWriteTransaction(db, { lock: 'ledger' }, (s) => writeOpeningBalance(s, entry));
}
