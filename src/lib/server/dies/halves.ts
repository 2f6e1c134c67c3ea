import { rawHandle, type DB } from '../db/connect';
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

/**
 * Replaces the cover or ejector half of a die: the old half is retired with its final count,
 * the new one starts at 0 and remembers the die total at install; the die total runs on. Runs in
 * one IMMEDIATE transaction on the raw handle, under the same connection lock as the shot ledger,
 * so no shot can land between reading the old half's count and retiring it. Audited.
 */
export async function replaceHalf(
	db: DB,
	dieId: number,
	input: HalfReplacement,
	actorId: string,
	at = nowIso()
): Promise<HalfReplaceResult> {
	const raw = rawHandle(db);
	const serial = input.serial.trim().toUpperCase();
	return db.connection().execute(async () =>
		raw
			.transaction((): HalfReplaceResult => {
				const die = raw
					.prepare<
						[number],
						{ id: number; number: string; status: DieStatus; total_shots: number }
					>('select id, number, status, total_shots from dies where id = ?')
					.get(dieId);
				if (!die) return { ok: false, field: 'die', message: 'That die does not exist.' };
				if (die.status === 'retired') {
					return {
						ok: false,
						field: 'die',
						message: `Die ${die.number} is retired; its halves stay as they are.`
					};
				}
				const clash = raw
					.prepare<[string], { number: string }>(
						`select dies.number from die_halves join dies on dies.id = die_halves.die_id
						  where upper(die_halves.serial) = ? limit 1`
					)
					.get(serial);
				if (clash) {
					return {
						ok: false,
						field: 'serial',
						message: `Serial ${serial} is already on record (die ${clash.number}). Each half needs its own serial.`
					};
				}
				const old = raw
					.prepare<[number, string], Pick<DieHalf, 'id' | 'serial' | 'shots'>>(
						'select id, serial, shots from die_halves where die_id = ? and side = ? and active = 1'
					)
					.get(die.id, input.side);
				if (old) {
					raw
						.prepare(
							'update die_halves set active = 0, removed_at = ?, removal_reason = ? where id = ?'
						)
						.run(at, input.reason.trim(), old.id);
				}
				const inserted = raw
					.prepare(
						`insert into die_halves (die_id, side, serial, steel, hardness_hrc, shots, active,
						   installed_at, die_shots_at_install)
						 values (?, ?, ?, ?, ?, 0, 1, ?, ?)`
					)
					.run(
						die.id,
						input.side,
						serial,
						input.steel.trim(),
						input.hardnessHrc,
						at,
						die.total_shots
					);
				// Entries already counted after the replacement time (a backdated replacement, or a
				// count dated ahead) belong to the new half: shots follow the time, not the typing.
				const after = old
					? raw
							.prepare<[number, string], { shots: number }>(
								`select coalesce(sum(shots), 0) as shots from shot_entries
								  where die_id = ? and counted_at > ? and voided_at is null`
							)
							.get(die.id, at)!.shots
					: 0;
				if (old && after !== 0) {
					const move = raw.prepare('update die_halves set shots = shots + ? where id = ?');
					move.run(-after, old.id);
					move.run(after, Number(inserted.lastInsertRowid));
				}
				const removed = old ? { serial: old.serial, shots: old.shots - after } : null;
				raw
					.prepare(
						'insert into audit_log (at, user_id, token_id, action, die_id, detail) values (?, ?, null, ?, ?, ?)'
					)
					.run(
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
					);
				return {
					ok: true,
					removed,
					installed: { id: Number(inserted.lastInsertRowid), serial },
					dieTotal: die.total_shots
				};
			})
			.immediate()
	);
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
