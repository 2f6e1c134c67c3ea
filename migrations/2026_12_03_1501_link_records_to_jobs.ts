import { sql, type Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// The toolroom job as the hub of bench work: a cooling check can be made under a job (surface
// inspections already carry job_id) and say that the line was flushed; a job photo says whether
// it shows the die before, during or after the work. Existing rows: made outside a job (null),
// not flushed (0: nobody said so), photo not tagged (null).

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.alterTable('cooling_checks')
		.addColumn('job_id', 'integer', (c) => c.references('toolroom_jobs.id'))
		.execute();
	await db.schema
		.alterTable('cooling_checks')
		.addColumn('flushed', 'integer', (c) =>
			c
				.notNull()
				.defaultTo(0)
				.check(sql`flushed in (0, 1)`)
		)
		.execute();
	await db.schema
		.alterTable('photos')
		.addColumn('stage', 'text', (c) =>
			c.check(sql`stage is null or stage in ('before','during','after')`)
		)
		.execute();
	await db.schema.createIndex('cooling_checks_job').on('cooling_checks').column('job_id').execute();
	await db.schema
		.createIndex('surface_inspections_job')
		.on('surface_inspections')
		.column('job_id')
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropIndex('surface_inspections_job').execute();
	await db.schema.dropIndex('cooling_checks_job').execute();
	await db.schema.alterTable('photos').dropColumn('stage').execute();
	await db.schema.alterTable('cooling_checks').dropColumn('flushed').execute();
	await db.schema.alterTable('cooling_checks').dropColumn('job_id').execute();
}
