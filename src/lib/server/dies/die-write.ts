import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { DieStatus, RetirementReason } from '../db/schema';
import { metalPressureBarOf, type DieForm } from '../../schemas/die';
import { writeAudit } from '../audit';
import { nowIso } from '../time';

export type WriteResult =
	{ ok: true; number: string } | { ok: false; field: string; message: string };

async function checkReferences(
	db: DB,
	form: DieForm,
	excludeDieId?: number
): Promise<WriteResult | null> {
	const [clash, customer, alloy] = await Promise.all([
		db
			.selectFrom('dies')
			.select('id')
			.where('number', '=', form.number)
			.$if(excludeDieId !== undefined, (q) => q.where('id', '!=', excludeDieId!))
			.executeTakeFirst(),
		db.selectFrom('customers').select('id').where('id', '=', form.customerId).executeTakeFirst(),
		db
			.selectFrom('alloys')
			.select(['id', 'family'])
			.where('id', '=', form.alloyId)
			.executeTakeFirst()
	]);
	if (clash) return { ok: false, field: 'number', message: `Die ${form.number} already exists.` };
	if (!customer) return { ok: false, field: 'customerId', message: 'That owner does not exist.' };
	if (!alloy) return { ok: false, field: 'alloyId', message: 'That alloy does not exist.' };
	return null;
}

/** The die's register data as columns; empty optional text is stored as null. */
function registerColumns(form: DieForm) {
	return {
		number: form.number,
		part_name: form.partName,
		part_number: form.partNumber || null,
		customer_id: form.customerId,
		alloy_id: form.alloyId,
		process: form.process,
		cavities: form.cavities,
		projected_area_cm2: form.projectedAreaCm2,
		has_slides: form.hasSlides ? 1 : 0,
		metal_pressure_bar: metalPressureBarOf(form),
		location: form.location || null,
		notes: form.notes || null,
		expected_life_shots: form.expectedLifeShots ?? null,
		replacement_lead_days: form.replacementLeadDays ?? null,
		shots_per_hour: form.plannedShotsPerHour ?? null
	};
}

/** Registers a new die with both halves and the service plan of its alloy family, in one transaction. */
export async function createDie(
	db: DB,
	form: DieForm,
	actorId: string,
	at = nowIso()
): Promise<WriteResult> {
	const problem = await checkReferences(db, form);
	if (problem) return problem;
	const alloy = await db
		.selectFrom('alloys')
		.select('family')
		.where('id', '=', form.alloyId)
		.executeTakeFirstOrThrow();
	await writeTransaction(db, async (trx) => {
		const die = await trx
			.insertInto('dies')
			.values({
				...registerColumns(form),
				created_at: at,
				updated_at: at
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		for (const side of ['cover', 'ejector'] as const) {
			const serial =
				(side === 'cover' ? form.coverSerial : form.ejectorSerial) ||
				`${form.number}-${side === 'cover' ? 'C' : 'E'}1`;
			await trx
				.insertInto('die_halves')
				.values({ die_id: die.id, side, serial, steel: form.steel || 'H13', installed_at: at })
				.execute();
		}
		const templates = await trx
			.selectFrom('service_templates')
			.selectAll()
			.where('family', '=', alloy.family)
			.execute();
		if (templates.length) {
			await trx
				.insertInto('service_tasks')
				.values(
					templates.map((t) => ({
						die_id: die.id,
						kind: t.kind,
						interval_shots: t.interval_shots,
						interval_days: t.interval_days,
						last_done_at: at
					}))
				)
				.execute();
		}
		await writeAudit(
			trx,
			{ userId: actorId, action: 'die.create', dieId: die.id, detail: { number: form.number } },
			at
		);
	});
	return { ok: true, number: form.number };
}

/** Edits the die's register data; counts, halves and status have their own flows. */
export async function updateDie(
	db: DB,
	dieId: number,
	form: DieForm,
	actorId: string
): Promise<WriteResult> {
	const problem = await checkReferences(db, form, dieId);
	if (problem) return problem;
	const at = nowIso();
	await writeTransaction(db, async (trx) => {
		const before = await trx
			.selectFrom('dies')
			.select('replacement_lead_days')
			.where('id', '=', dieId)
			.executeTakeFirst();
		const columns = registerColumns(form);
		await trx
			.updateTable('dies')
			.set({ ...columns, updated_at: at })
			.where('id', '=', dieId)
			.execute();
		// The lead time is named with before and after, so the audit page shows its change.
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'die.edit',
				dieId,
				detail: {
					number: form.number,
					before: { replacementLeadDays: before?.replacement_lead_days ?? null },
					after: { replacementLeadDays: columns.replacement_lead_days }
				}
			},
			at
		);
	});
	return { ok: true, number: form.number };
}

/** Moves a die to another state with a reason on the audit trail. Retired is final. */
export async function changeDieStatus(
	db: DB,
	die: { id: number; status: DieStatus },
	to: DieStatus,
	reason: string,
	actorId: string,
	retirementReason: RetirementReason | null = null
): Promise<{ ok: true } | { ok: false; message: string }> {
	if (die.status === 'retired') return { ok: false, message: 'A retired die cannot change state.' };
	if ((to === 'retired') !== (retirementReason !== null)) {
		return {
			ok: false,
			message:
				to === 'retired'
					? 'Say why the die is retired.'
					: 'A retirement reason goes only with retiring the die.'
		};
	}
	if (die.status === to) return { ok: false, message: 'The die is already in that state.' };
	const at = nowIso();
	await writeTransaction(db, async (trx) => {
		await trx
			.updateTable('dies')
			.set({
				status: to,
				updated_at: at,
				retired_at: to === 'retired' ? at : null,
				retirement_reason: retirementReason
			})
			.where('id', '=', die.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'die.status',
				dieId: die.id,
				detail: retirementReason
					? { from: die.status, to, reason, retirementReason }
					: { from: die.status, to, reason }
			},
			at
		);
	});
	return { ok: true };
}
