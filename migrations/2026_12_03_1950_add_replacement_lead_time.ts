import { sql, type Kysely } from 'kysely';

// How long a replacement die takes to get, so an owner can be told when to order one: each die
// may carry its own lead time in days; without one, the plant's default for the alloy family
// applies. Existing dies start without their own figure (the family default then counts). The
// family defaults start at 84 days (12 weeks) — common practice for a new pressure die-casting
// die, to be set by the plant.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('dies').addColumn('replacement_lead_days', 'integer').execute();
	await db.schema
		.createTable('replacement_lead_defaults')
		.addColumn('family', 'text', (c) =>
			c.primaryKey().check(sql`family in ('zinc', 'magnesium', 'aluminium', 'copper')`)
		)
		.addColumn('lead_days', 'integer', (c) => c.notNull().check(sql`lead_days between 1 and 3650`))
		.addColumn('updated_at', 'text')
		.addColumn('updated_by', 'text')
		.execute();
	await db
		.insertInto('replacement_lead_defaults')
		.values(
			['zinc', 'magnesium', 'aluminium', 'copper'].map((family) => ({ family, lead_days: 84 }))
		)
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('replacement_lead_defaults').execute();
	await db.schema.alterTable('dies').dropColumn('replacement_lead_days').execute();
}
