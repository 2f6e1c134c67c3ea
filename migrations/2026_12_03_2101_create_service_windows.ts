import { sql, type Kysely } from 'kysely';
import { autoId } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Service windows: time the toolroom reserves on a die between press bookings (die, start, end,
// kind, note). A window blocks bookings of its die that overlap it and becomes a toolroom job when
// it starts: `started_at` is claimed once (by the one-click start or the scheduled run) and
// `job_id` then points at the job. Cancelled windows stay, with who and when, for the audit trail.
// A new table only: existing plants start with no windows.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('service_windows')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id').onDelete('cascade'))
		.addColumn('starts_at', 'text', (c) => c.notNull())
		.addColumn('ends_at', 'text', (c) => c.notNull())
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('note', 'text')
		.addColumn('created_by', 'text', (c) => c.references('users.id').onDelete('set null'))
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addColumn('cancelled_at', 'text')
		.addColumn('cancelled_by', 'text', (c) => c.references('users.id').onDelete('set null'))
		.addColumn('cancel_reason', 'text')
		.addColumn('started_at', 'text')
		.addColumn('job_id', 'integer', (c) => c.references('toolroom_jobs.id').onDelete('set null'))
		.addColumn('start_problem', 'text')
		.addCheckConstraint('service_windows_order_check', sql`ends_at > starts_at`)
		.execute();
	await db.schema
		.createIndex('service_windows_die_start')
		.on('service_windows')
		.columns(['die_id', 'starts_at'])
		.execute();
	// The scheduled start looks for windows whose start has come and that nobody started yet.
	await db.schema
		.createIndex('service_windows_unstarted')
		.on('service_windows')
		.column('starts_at')
		.where(sql.ref('started_at'), 'is', null)
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('service_windows').execute();
}
