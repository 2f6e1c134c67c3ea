import type { DB } from '../db/connect';
import type { Alloy, AlloyFamily, NewAlloy } from '../db/schema';

export async function listAlloys(db: DB) {
	return db.selectFrom('alloys').selectAll().orderBy('family').orderBy('name').execute();
}

export async function findAlloy(db: DB, id: number) {
	return db.selectFrom('alloys').selectAll().where('id', '=', id).executeTakeFirst();
}

/** The fields of an alloy as the audit log records them (before → after). */
export function alloyAuditView(a: Alloy) {
	return {
		code: a.code,
		name: a.name,
		family: a.family,
		expectedLifeShots: a.expected_life_shots,
		densityKgM3: a.density_kg_m3,
		specificHeatJKgK: a.specific_heat_j_kgk,
		latentHeatJKg: a.latent_heat_j_kg,
		solidusC: a.solidus_c,
		liquidusC: a.liquidus_c,
		pourTempC: a.pour_temp_c
	};
}

export async function saveAlloy(
	db: DB,
	input: Omit<NewAlloy, 'id'> & { id?: number | null }
): Promise<{ ok: true; id: number } | { ok: false; field: 'code'; message: string }> {
	const code = input.code.trim().toUpperCase();
	const clash = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', code)
		.$if(!!input.id, (q) => q.where('id', '!=', input.id!))
		.executeTakeFirst();
	if (clash)
		return { ok: false, field: 'code', message: `The alloy code ${code} is already in use.` };
	const { id, ...rest } = input;
	const values = { ...rest, code, name: input.name.trim() };
	if (id) {
		await db.updateTable('alloys').set(values).where('id', '=', id).execute();
		return { ok: true, id };
	}
	const row = await db
		.insertInto('alloys')
		.values(values)
		.returning('id')
		.executeTakeFirstOrThrow();
	return { ok: true, id: row.id };
}

export async function listServiceTemplates(db: DB, family?: AlloyFamily) {
	return db
		.selectFrom('service_templates')
		.selectAll()
		.$if(!!family, (q) => q.where('family', '=', family!))
		.orderBy('family')
		.orderBy('kind')
		.execute();
}
