import type { SqlSession } from '../db/session';

export interface OpeningBalance {
	dieId: number;
	shots: number;
	/** When the balance is entered (the import); the entry is dated on it. */
	at: string;
	userId: string | null;
	note: string;
}

/**
 * Writes a die's opening balance — the shots it made before Castellan — as a ledger entry of
 * source 'opening', with the die total and its current halves' counts, in the caller's
 * transaction, through its session (the sibling of recordShots for a die that has just been registered).
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
	const has = await s.get<{ n: number }>(
		'select count(*) as n from shot_entries where die_id = ?',
		[entry.dieId]
	);
	if (has!.n > 0)
		throw new Error('A die that already has ledger entries takes no opening balance.');
	await s.run(
		`insert into shot_entries (die_id, machine_id, counted_at, shots, counter_start, counter_end,
		   source, idem_key, entered_by, token_id, note, created_at)
		 values (?, null, ?, ?, null, null, 'opening', null, ?, null, ?, ?)`,
		[entry.dieId, entry.at, entry.shots, entry.userId, entry.note, entry.at]
	);
	await s.run('update dies set total_shots = total_shots + ?, updated_at = ? where id = ?', [
		entry.shots,
		entry.at,
		entry.dieId
	]);
	// The half went in at die count die_shots_at_install: it gets what came after, never below 0.
	await s.run(
		`update die_halves
		    set shots = shots + case when ? > die_shots_at_install then ? - die_shots_at_install else 0 end
		  where die_id = ? and active = 1`,
		[entry.shots, entry.shots, entry.dieId]
	);
}
