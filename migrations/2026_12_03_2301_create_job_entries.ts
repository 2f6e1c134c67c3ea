import { sql, type Kysely } from 'kysely';
import { autoId, float } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Hours and parts are recorded while a job is open, not only when it closes: one row per work
// entry (hours, note) and per part used (part, quantity). toolroom_jobs.hours stays, as the kept
// sum of the job's standing work entries. A job closed before this had its hours only on the job
// row: each becomes one work entry at its close (by whoever closed it), so the sum is unchanged.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('job_work_entries')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('job_id', 'integer', (c) => c.notNull().references('toolroom_jobs.id'))
		.addColumn('hours', float(db), (c) => c.notNull())
		.addColumn('note', 'text')
		.addColumn('recorded_by', 'text', (c) => c.references('users.id'))
		.addColumn('recorded_at', 'text', (c) => c.notNull())
		.addColumn('voided_at', 'text')
		.addColumn('voided_by', 'text', (c) => c.references('users.id'))
		.addColumn('void_reason', 'text')
		.execute();
	await db.schema
		.createIndex('job_work_entries_job')
		.on('job_work_entries')
		.column('job_id')
		.execute();
	await db.schema
		.createTable('job_parts_used')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('job_id', 'integer', (c) => c.notNull().references('toolroom_jobs.id'))
		.addColumn('part', 'text', (c) => c.notNull())
		.addColumn('quantity', float(db), (c) => c.notNull())
		.addColumn('recorded_by', 'text', (c) => c.references('users.id'))
		.addColumn('recorded_at', 'text', (c) => c.notNull())
		.addColumn('voided_at', 'text')
		.addColumn('voided_by', 'text', (c) => c.references('users.id'))
		.addColumn('void_reason', 'text')
		.execute();
	await db.schema.createIndex('job_parts_used_job').on('job_parts_used').column('job_id').execute();
	await sql`insert into job_work_entries (job_id, hours, note, recorded_by, recorded_at)
		select id, hours, 'Recorded when the job was closed', closed_by, coalesce(closed_at, updated_at)
		from toolroom_jobs where hours is not null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('job_parts_used').execute();
	await db.schema.dropTable('job_work_entries').execute();
}
