import type { Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// What each press last told Castellan through counted shots (the press gateway or any API client
// naming a press): the die credited, the counter reading, when it was counted and when it arrived.
// One row per press, replaced on every write, so the presses page and the idle check never scan
// the ledger. Existing plants start with no rows: nothing has arrived yet.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('press_feed')
		.addColumn('machine_id', 'integer', (c) =>
			c.primaryKey().references('machines.id').onDelete('cascade')
		)
		.addColumn('die_id', 'integer', (c) => c.references('dies.id').onDelete('set null'))
		.addColumn('last_counter', 'integer')
		.addColumn('last_counted_at', 'text', (c) => c.notNull())
		.addColumn('last_received_at', 'text', (c) => c.notNull())
		.addColumn('entries', 'integer', (c) => c.notNull().defaultTo(0))
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('press_feed').execute();
}
