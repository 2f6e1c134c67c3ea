import type { Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Toolmakers add and edit a die's cooling circuits; the toolroom lead can lock a die's circuit
// list. Existing dies start unlocked (0), as nothing was locked before.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.alterTable('dies')
		.addColumn('cooling_locked', 'integer', (c) => c.notNull().defaultTo(0))
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('dies').dropColumn('cooling_locked').execute();
}
