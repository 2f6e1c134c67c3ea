import { knToUsTon, tonneForceToKn, usTonToKn } from '../../calc/clamp';
import { inToMm, kgToLb, lbToKg, mmToIn, type UnitSystem } from '../../calc/units';
import type { ForceUnit, PressForm } from '../../schemas/schedule';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { Machine } from '../db/schema';
import { nowIso } from '../time';

export type Press = Machine;

/** Every press, by name, with its count of upcoming bookings. */
export async function listPresses(db: DB, asOf = nowIso()) {
	return db
		.selectFrom('machines')
		.leftJoin('press_bookings as b', (join) =>
			join
				.onRef('b.machine_id', '=', 'machines.id')
				.on('b.cancelled_at', 'is', null)
				.on('b.ends_at', '>', asOf)
		)
		.selectAll('machines')
		.select((eb) => eb.fn.count<number>('b.id').as('upcoming'))
		.groupBy('machines.id')
		.orderBy('machines.name')
		.execute();
}

/** Name and chamber of every press, for selects and filters. */
export async function listPressOptions(db: DB) {
	return db
		.selectFrom('machines')
		.select(['id', 'name', 'chamber', 'clamp_force_kn', 'status'])
		.orderBy('name')
		.execute();
}

export async function findPress(db: DB, id: number) {
	return db.selectFrom('machines').selectAll().where('id', '=', id).executeTakeFirst();
}

export async function findPressByName(db: DB, name: string) {
	return db
		.selectFrom('machines')
		.selectAll()
		.where((eb) => eb(eb.fn('upper', ['name']), '=', name.trim().toUpperCase()))
		.executeTakeFirst();
}

/** Force entered in a unit → kN (unit definitions in calc/clamp). */
export function forceToKn(value: number, unit: ForceUnit): number {
	if (unit === 'tf') return tonneForceToKn(value);
	if (unit === 'ust') return usTonToKn(value);
	return value;
}

function roundTo(value: number, digits: number) {
	const f = 10 ** digits;
	return Math.round(value * f) / f;
}

/** The press as its edit form shows it, in the user's units. */
export function pressToForm(press: Press, system: UnitSystem): PressForm {
	const us = system === 'us';
	return {
		name: press.name,
		chamber: press.chamber,
		clampForce: roundTo(us ? knToUsTon(press.clamp_force_kn) : press.clamp_force_kn, 1),
		clampUnit: us ? 'ust' : 'kN',
		maxShotWeight:
			press.max_shot_weight_kg === null
				? undefined
				: roundTo(us ? kgToLb(press.max_shot_weight_kg) : press.max_shot_weight_kg, 2),
		tieBarSpacing:
			press.tie_bar_spacing_mm === null
				? undefined
				: roundTo(us ? mmToIn(press.tie_bar_spacing_mm) : press.tie_bar_spacing_mm, 2),
		status: press.status,
		dieChangeMinutes: press.die_change_minutes,
		preheatMinutes: press.preheat_minutes,
		shotsPerHour: press.shots_per_hour ?? undefined,
		notes: press.notes ?? ''
	};
}

/** Press form (user's units) → row values in SI. */
function formToRow(form: PressForm, system: UnitSystem) {
	const us = system === 'us';
	return {
		name: form.name,
		chamber: form.chamber,
		clamp_force_kn: roundTo(forceToKn(form.clampForce, form.clampUnit), 1),
		max_shot_weight_kg:
			form.maxShotWeight === undefined
				? null
				: roundTo(us ? lbToKg(form.maxShotWeight) : form.maxShotWeight, 3),
		tie_bar_spacing_mm:
			form.tieBarSpacing === undefined
				? null
				: roundTo(us ? inToMm(form.tieBarSpacing) : form.tieBarSpacing, 1),
		status: form.status,
		die_change_minutes: form.dieChangeMinutes,
		preheat_minutes: form.preheatMinutes,
		shots_per_hour: form.shotsPerHour ?? null,
		notes: form.notes || null
	};
}

export type PressWriteResult =
	{ ok: true; id: number } | { ok: false; field: 'name'; message: string };

/** Creates a press (id undefined) or updates one; names stay unique. */
export async function savePress(
	db: DB,
	form: PressForm,
	system: UnitSystem,
	actorId: string,
	id?: number
): Promise<PressWriteResult> {
	const clash = await db
		.selectFrom('machines')
		.select('id')
		.where((eb) => eb(eb.fn('upper', ['name']), '=', form.name))
		.$if(id !== undefined, (q) => q.where('id', '!=', id!))
		.executeTakeFirst();
	if (clash)
		return { ok: false, field: 'name', message: `A press named ${form.name} already exists.` };
	const values = formToRow(form, system);
	return writeTransaction(db, async (trx) => {
		let pressId = id;
		if (pressId === undefined) {
			pressId = (
				await trx.insertInto('machines').values(values).returning('id').executeTakeFirstOrThrow()
			).id;
		} else {
			await trx.updateTable('machines').set(values).where('id', '=', pressId).execute();
		}
		await writeAudit(trx, {
			userId: actorId,
			action: id === undefined ? 'press.create' : 'press.update',
			detail: { press: values.name, ...values }
		});
		return { ok: true as const, id: pressId };
	});
}

/**
 * Deletes a press nobody has used: a press with bookings or counted shots stays for the record
 * (mark it down instead).
 */
export async function deletePress(
	db: DB,
	id: number,
	actorId: string
): Promise<{ ok: true } | { ok: false; message: string }> {
	const [press, booking, shot] = await Promise.all([
		findPress(db, id),
		db
			.selectFrom('press_bookings')
			.select('id')
			.where('machine_id', '=', id)
			.limit(1)
			.executeTakeFirst(),
		db
			.selectFrom('shot_entries')
			.select('id')
			.where('machine_id', '=', id)
			.limit(1)
			.executeTakeFirst()
	]);
	if (!press) return { ok: false, message: 'That press does not exist.' };
	if (booking || shot) {
		return {
			ok: false,
			message: `${press.name} has bookings or counted shots, so it stays on record. Set its status to down instead.`
		};
	}
	await writeTransaction(db, async (trx) => {
		await trx.deleteFrom('machines').where('id', '=', id).execute();
		await writeAudit(trx, {
			userId: actorId,
			action: 'press.delete',
			detail: { press: press.name }
		});
	});
	return { ok: true };
}
