import type { DB } from '../db/connect';
import { inWriteTransaction } from '../db/session';
import type { DieHalf, DieStatus, HalfSide } from '../db/schema';
import { nowIso } from '../time';

export interface HalfReplacement {
	side: HalfSide;
	serial: string;
	steel: string;
	hardnessHrc: number;
	reason: string;
}

export type HalfReplaceResult =
	| {
			ok: true;
			removed: { serial: string; shots: number } | null;
			installed: { id: number; serial: string };
			dieTotal: number;
	  }
	| { ok: false; field: 'side' | 'serial' | 'die'; message: string };

const SQL = {
	die: 'select id, number, status, total_shots from dies where id = ?',
	serialClash: `select dies.number from die_halves join dies on dies.id = die_halves.die_id
	  where upper(die_halves.serial) = ? limit 1`,
	current: 'select id, serial, shots from die_halves where die_id = ? and side = ? and active = 1',
	retire: 'update die_halves set active = 0, removed_at = ?, removal_reason = ? where id = ?',
	insert: `insert into die_halves (die_id, side, serial, steel, hardness_hrc, shots, active,
	   installed_at, die_shots_at_install)
	 values (?, ?, ?, ?, ?, 0, 1, ?, ?) returning id`,
	shotsAfter: `select coalesce(sum(shots), 0) as shots from shot_entries
	  where die_id = ? and counted_at > ? and voided_at is null`,
	move: 'update die_halves set shots = shots + ? where id = ?',
	audit:
		'insert into audit_log (at, user_id, token_id, action, die_id, detail) values (?, ?, null, ?, ?, ?)'
};

/**
 * Replaces the cover or ejector half of a die: the old half is retired with its final count,
 * the new one starts at 0 and remembers the die total at install; the die total runs on. Runs in
 * one write transaction under the shot ledger's lock, so no shot can land between reading the
 * old half's count and retiring it (on PostgreSQL, not from another app process either). Audited.
 */
export async function replaceHalf(
	db: DB,
	dieId: number,
	input: HalfReplacement,
	actorId: string,
	at = nowIso()
): Promise<HalfReplaceResult> {
	const serial = input.serial.trim().toUpperCase();
	return inWriteTransaction(db, { lock: 'ledger' }, async (s): Promise<HalfReplaceResult> => {
		const die = await s.get<{ id: number; number: string; status: DieStatus; total_shots: number }>(
			SQL.die,
			[dieId]
		);
		if (!die) return { ok: false, field: 'die', message: 'That die does not exist.' };
		if (die.status === 'retired') {
			return {
				ok: false,
				field: 'die',
				message: `Die ${die.number} is retired; its halves stay as they are.`
			};
		}
		const clash = await s.get<{ number: string }>(SQL.serialClash, [serial]);
		if (clash) {
			return {
				ok: false,
				field: 'serial',
				message: `Serial ${serial} is already on record (die ${clash.number}). Each half needs its own serial.`
			};
		}
		const old = await s.get<Pick<DieHalf, 'id' | 'serial' | 'shots'>>(SQL.current, [
			die.id,
			input.side
		]);
		if (old) await s.run(SQL.retire, [at, input.reason.trim(), old.id]);
		const inserted = await s.get<{ id: number }>(SQL.insert, [
			die.id,
			input.side,
			serial,
			input.steel.trim(),
			input.hardnessHrc,
			at,
			die.total_shots
		]);
		const installedId = Number(inserted!.id);
		// Entries already counted after the replacement time (a backdated replacement, or a
		// count dated ahead) belong to the new half: shots follow the time, not the typing.
		const after = old
			? Number((await s.get<{ shots: number }>(SQL.shotsAfter, [die.id, at]))!.shots)
			: 0;
		if (old && after !== 0) {
			await s.run(SQL.move, [-after, old.id]);
			await s.run(SQL.move, [after, installedId]);
		}
		const removed = old ? { serial: old.serial, shots: old.shots - after } : null;
		await s.run(SQL.audit, [
			at,
			actorId,
			'half.replace',
			die.id,
			JSON.stringify({
				side: input.side,
				removed,
				installed: { serial, steel: input.steel.trim(), hardnessHrc: input.hardnessHrc },
				dieShots: die.total_shots,
				reason: input.reason.trim()
			})
		]);
		return { ok: true, removed, installed: { id: installedId, serial }, dieTotal: die.total_shots };
	});
}

/** Every half the die has had, current ones first, then by side and newest install. */
export async function listHalves(db: DB, dieId: number) {
	return db
		.selectFrom('die_halves')
		.selectAll()
		.where('die_id', '=', dieId)
		.orderBy('active', 'desc')
		.orderBy('side')
		.orderBy('installed_at', 'desc')
		.orderBy('id', 'desc')
		.execute();
}
