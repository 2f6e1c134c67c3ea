import type { Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Surface inspections, cooling checks and toolroom jobs can be voided (with a reason, by the
// toolroom lead) or corrected (the corrected record points at the one it replaces). Voided rows
// stay in the table so history and the audit log keep them; figures leave them out. Existing rows
// are neither voided nor corrections, so every new column starts null.
// A cooling check with an unusual reading (outlet not warmer than inlet, flow above 3× nominal)
// keeps the reason the toolmaker confirmed.

const TABLES = ['surface_inspections', 'cooling_checks', 'toolroom_jobs'] as const;

export async function up(db: Kysely<any>): Promise<void> {
	for (const table of TABLES) {
		await db.schema.alterTable(table).addColumn('voided_at', 'text').execute();
		await db.schema
			.alterTable(table)
			.addColumn('voided_by', 'text', (c) => c.references('users.id'))
			.execute();
		await db.schema.alterTable(table).addColumn('void_reason', 'text').execute();
	}
	for (const table of ['surface_inspections', 'cooling_checks'] as const) {
		await db.schema
			.alterTable(table)
			.addColumn('corrects_id', 'integer', (c) => c.references(`${table}.id`))
			.execute();
	}
	await db.schema.alterTable('cooling_checks').addColumn('unusual_reason', 'text').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('cooling_checks').dropColumn('unusual_reason').execute();
	for (const table of ['surface_inspections', 'cooling_checks'] as const) {
		await db.schema.alterTable(table).dropColumn('corrects_id').execute();
	}
	for (const table of TABLES) {
		await db.schema.alterTable(table).dropColumn('void_reason').execute();
		await db.schema.alterTable(table).dropColumn('voided_by').execute();
		await db.schema.alterTable(table).dropColumn('voided_at').execute();
	}
}
