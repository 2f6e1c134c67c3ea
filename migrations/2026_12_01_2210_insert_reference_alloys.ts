import type { Kysely } from 'kysely';

// Starting reference data every plant gets; each plant edits it under Settings.
// Expected life: NADCA FAQ "Alloy properties — processing and production", average tool life in
// shots (zinc 500 000, magnesium 200 000, aluminium 125 000, brass 20 000).
// Physical properties: A380 from NADCA product specification A-3-2 (latent heat medium
// confidence); Zamak 3 from EN 12844 (ZP0400); AZ91D from supplier typical-property tables;
// brass values are from memory. Pour temperatures are common practice.
const alloys = [
	{
		code: 'ZP0400',
		name: 'Zamak 3 (ZP0400)',
		family: 'zinc',
		expected_life_shots: 500000,
		density_kg_m3: 6700,
		specific_heat_j_kgk: 419,
		latent_heat_j_kg: null,
		solidus_c: 381,
		liquidus_c: 387,
		pour_temp_c: 425,
		source_note: 'EN 12844; NADCA FAQ tool life'
	},
	{
		code: 'ZP0410',
		name: 'Zamak 5 (ZP0410)',
		family: 'zinc',
		expected_life_shots: 500000,
		density_kg_m3: 6700,
		specific_heat_j_kgk: 419,
		latent_heat_j_kg: null,
		solidus_c: 380,
		liquidus_c: 386,
		pour_temp_c: 425,
		source_note: 'EN 12844 (from memory); NADCA FAQ tool life'
	},
	{
		code: 'AZ91D',
		name: 'AZ91D magnesium',
		family: 'magnesium',
		expected_life_shots: 200000,
		density_kg_m3: 1820,
		specific_heat_j_kgk: 1050,
		latent_heat_j_kg: 350000,
		solidus_c: 470,
		liquidus_c: 595,
		pour_temp_c: 650,
		source_note: 'Supplier typical properties; NADCA FAQ tool life'
	},
	{
		code: 'A380',
		name: 'A380 aluminium',
		family: 'aluminium',
		expected_life_shots: 125000,
		density_kg_m3: 2710,
		specific_heat_j_kgk: 963,
		latent_heat_j_kg: 389000,
		solidus_c: 540,
		liquidus_c: 595,
		pour_temp_c: 660,
		source_note: 'NADCA A-3-2; NADCA FAQ tool life'
	},
	{
		code: 'EN-AC-46000',
		name: 'AlSi9Cu3(Fe) (EN AC-46000)',
		family: 'aluminium',
		expected_life_shots: 125000,
		density_kg_m3: 2750,
		specific_heat_j_kgk: 960,
		latent_heat_j_kg: null,
		solidus_c: 520,
		liquidus_c: 600,
		pour_temp_c: 670,
		source_note: 'From memory; NADCA FAQ tool life'
	},
	{
		code: 'CW617N',
		name: 'Brass CuZn40Pb2 (die-casting brass)',
		family: 'copper',
		expected_life_shots: 20000,
		density_kg_m3: 8440,
		specific_heat_j_kgk: 377,
		latent_heat_j_kg: null,
		solidus_c: 880,
		liquidus_c: 900,
		pour_temp_c: 960,
		source_note: 'From memory; NADCA FAQ tool life'
	}
];

// Plant defaults for service plans, editable per die. Stress-relief spacing follows H13 plant
// practice (every 10 000–20 000 shots, later 25 000–30 000 — from memory); the other intervals
// are common practice starting points, not published values.
const templates = [
	['zinc', 'stress_relief', 50000, null],
	['zinc', 'surface_inspection', 25000, 60],
	['zinc', 'cooling_flush', null, 90],
	['zinc', 'teardown', 150000, 365],
	['magnesium', 'stress_relief', 20000, null],
	['magnesium', 'surface_inspection', 10000, 45],
	['magnesium', 'cooling_flush', null, 90],
	['magnesium', 'teardown', 60000, 365],
	['aluminium', 'stress_relief', 15000, null],
	['aluminium', 'surface_inspection', 7500, 30],
	['aluminium', 'cooling_flush', null, 60],
	['aluminium', 'teardown', 40000, 365],
	['copper', 'stress_relief', 5000, null],
	['copper', 'surface_inspection', 2500, 30],
	['copper', 'cooling_flush', null, 60],
	['copper', 'teardown', 10000, 180]
] as const;

export async function up(db: Kysely<any>): Promise<void> {
	await db.insertInto('alloys').values(alloys).execute();
	await db
		.insertInto('service_templates')
		.values(
			templates.map(([family, kind, interval_shots, interval_days]) => ({
				family,
				kind,
				interval_shots,
				interval_days
			}))
		)
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.deleteFrom('service_templates').execute();
	await db
		.deleteFrom('alloys')
		.where(
			'code',
			'in',
			alloys.map((a) => a.code)
		)
		.execute();
}
