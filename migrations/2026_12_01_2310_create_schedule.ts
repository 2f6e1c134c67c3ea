import { sql, type Kysely } from 'kysely';
import { autoId, float } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Press bookings. Presses are the `machines` table of the foundation migration.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('press_bookings')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('machine_id', 'integer', (c) => c.notNull().references('machines.id'))
		.addColumn('starts_at', 'text', (c) => c.notNull())
		.addColumn('ends_at', 'text', (c) => c.notNull())
		.addColumn('order_ref', 'text', (c) => c.notNull())
		.addColumn('parts', 'integer', (c) => c.notNull())
		.addColumn('scrap_pct', float(db), (c) => c.notNull().defaultTo(0))
		.addColumn('shots_per_hour', float(db), (c) => c.notNull())
		.addColumn('created_by', 'text', (c) => c.references('users.id'))
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addColumn('cancelled_at', 'text')
		.addColumn('cancelled_by', 'text', (c) => c.references('users.id'))
		.addColumn('cancel_reason', 'text')
		.addColumn('notes', 'text')
		.addCheckConstraint('press_bookings_window_check', sql`ends_at > starts_at`)
		.addCheckConstraint('press_bookings_parts_check', sql`parts >= 1`)
		.addCheckConstraint('press_bookings_scrap_check', sql`scrap_pct >= 0 and scrap_pct < 100`)
		.addCheckConstraint('press_bookings_rate_check', sql`shots_per_hour > 0`)
		.execute();
	// Window queries range over starts_at (bookings have a bounded length, so a window only needs
	// the starts in [from − longest booking, to)) and test ends_at from the same index entry;
	// overlap checks look per die and per press.
	await db.schema
		.createIndex('press_bookings_window')
		.on('press_bookings')
		.columns(['starts_at', 'ends_at'])
		.execute();
	await db.schema
		.createIndex('press_bookings_die')
		.on('press_bookings')
		.columns(['die_id', 'starts_at'])
		.execute();
	await db.schema
		.createIndex('press_bookings_machine')
		.on('press_bookings')
		.columns(['machine_id', 'starts_at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('press_bookings').execute();
}
