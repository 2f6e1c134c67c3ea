import type { Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Several app processes may serve one plant database, each with the notice job's cron. The first
// process to write a scheduled slot's row (`castellan-notices:2026-03-02T05:00:00.000Z`) runs
// that slot; the others see the row and skip it, so each schedule runs once however many
// processes there are. Times are ISO-8601 text in UTC like everywhere else.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('job_runs')
		.addColumn('run_key', 'text', (c) => c.primaryKey())
		.addColumn('taken_by', 'text', (c) => c.notNull())
		.addColumn('taken_at', 'text', (c) => c.notNull())
		.addColumn('finished_at', 'text')
		.execute();
	await db.schema.createIndex('job_runs_taken_at').on('job_runs').column('taken_at').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('job_runs').execute();
}
