import { sql, type Kysely } from 'kysely';
import { autoId, float, nowText } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Toolroom jobs, their photos, surface inspections (heat checking) and cooling circuits/checks.
// Dates are ISO-8601 text in UTC; booleans are 0/1 integers.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('toolroom_jobs')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('number', 'text', (c) => c.notNull().unique())
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('half', 'text', (c) => c.notNull())
		.addColumn('zone', 'text')
		.addColumn('description', 'text', (c) => c.notNull())
		.addColumn('assigned_to', 'text', (c) => c.references('users.id'))
		.addColumn('status', 'text', (c) => c.notNull().defaultTo('open'))
		.addColumn('source', 'text', (c) => c.notNull().defaultTo('die'))
		.addColumn('notice_id', 'integer')
		.addColumn('die_to_toolroom', 'integer', (c) => c.notNull().defaultTo(1))
		.addColumn('die_shots_at_open', 'integer', (c) => c.notNull())
		.addColumn('opened_by', 'text', (c) => c.references('users.id'))
		.addColumn('opened_at', 'text', (c) => c.notNull())
		.addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(nowText(db)))
		.addColumn('closed_at', 'text')
		.addColumn('closed_by', 'text', (c) => c.references('users.id'))
		.addColumn('die_shots_at_close', 'integer')
		.addColumn('findings', 'text')
		.addColumn('work_done', 'text')
		.addColumn('hours', float(db))
		.addColumn('parts_used', 'text')
		.addColumn('billable_to_owner', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('owner_summary', 'text')
		.addColumn('summary_shared', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('cancel_reason', 'text')
		.addCheckConstraint(
			'toolroom_jobs_status_check',
			sql`status in ('open','in_progress','waiting_parts','done','cancelled')`
		)
		.addCheckConstraint('toolroom_jobs_half_check', sql`half in ('cover','ejector','both')`)
		.addCheckConstraint(
			'toolroom_jobs_source_check',
			sql`source in ('die','service_task','notice')`
		)
		.addCheckConstraint('toolroom_jobs_hours_check', sql`hours is null or hours >= 0`)
		.addCheckConstraint(
			'toolroom_jobs_closed_check',
			sql`(status in ('done','cancelled')) = (closed_at is not null)`
		)
		.execute();
	await db.schema
		.createIndex('toolroom_jobs_die')
		.on('toolroom_jobs')
		.columns(['die_id', 'opened_at'])
		.execute();
	await db.schema
		.createIndex('toolroom_jobs_status')
		.on('toolroom_jobs')
		.columns(['status', 'opened_at'])
		.execute();

	await db.schema
		.createTable('job_service_tasks')
		.addColumn('job_id', 'integer', (c) => c.notNull().references('toolroom_jobs.id'))
		.addColumn('service_task_id', 'integer', (c) => c.notNull().references('service_tasks.id'))
		.addColumn('done_at_shots', 'integer')
		.addPrimaryKeyConstraint('job_service_tasks_pk', ['job_id', 'service_task_id'])
		.execute();

	await db.schema
		.createTable('surface_inspections')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('job_id', 'integer', (c) => c.references('toolroom_jobs.id'))
		.addColumn('half', 'text', (c) => c.notNull())
		.addColumn('zone', 'text', (c) => c.notNull())
		.addColumn('shots_at', 'integer', (c) => c.notNull())
		.addColumn('grade', 'integer', (c) => c.notNull())
		.addColumn('longest_crack_mm', float(db))
		.addColumn('soldering', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('erosion', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('notes', 'text')
		.addColumn('inspected_by', 'text', (c) => c.references('users.id'))
		.addColumn('inspected_at', 'text', (c) => c.notNull())
		.addCheckConstraint('surface_inspections_half_check', sql`half in ('cover','ejector')`)
		.addCheckConstraint('surface_inspections_grade_check', sql`grade between 0 and 4`)
		.addCheckConstraint('surface_inspections_shots_check', sql`shots_at >= 0`)
		.addCheckConstraint(
			'surface_inspections_crack_check',
			sql`longest_crack_mm is null or longest_crack_mm >= 0`
		)
		.execute();
	await db.schema
		.createIndex('surface_inspections_die')
		.on('surface_inspections')
		.columns(['die_id', 'half', 'zone', 'shots_at'])
		.execute();

	await db.schema
		.createTable('photos')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('public_id', 'text', (c) => c.notNull().unique())
		.addColumn('job_id', 'integer', (c) => c.references('toolroom_jobs.id'))
		.addColumn('inspection_id', 'integer', (c) => c.references('surface_inspections.id'))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('full_file', 'text', (c) => c.notNull())
		.addColumn('thumb_file', 'text', (c) => c.notNull())
		.addColumn('width', 'integer', (c) => c.notNull())
		.addColumn('height', 'integer', (c) => c.notNull())
		.addColumn('sha256', 'text', (c) => c.notNull())
		.addColumn('bytes', 'integer', (c) => c.notNull())
		.addColumn('thumb_bytes', 'integer', (c) => c.notNull())
		.addColumn('source_type', 'text', (c) => c.notNull())
		.addColumn('uploaded_by', 'text', (c) => c.references('users.id'))
		.addColumn('uploaded_at', 'text', (c) => c.notNull())
		.addColumn('caption', 'text')
		.addColumn('shared_with_owner', 'integer', (c) => c.notNull().defaultTo(0))
		.addCheckConstraint('photos_owner_check', sql`(job_id is null) <> (inspection_id is null)`)
		.addCheckConstraint('photos_source_check', sql`source_type in ('jpeg','png')`)
		.execute();
	await db.schema.createIndex('photos_job').on('photos').column('job_id').execute();
	await db.schema.createIndex('photos_inspection').on('photos').column('inspection_id').execute();
	await db.schema.createIndex('photos_die').on('photos').column('die_id').execute();

	await db.schema
		.createTable('cooling_circuits')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('half', 'text', (c) => c.notNull())
		.addColumn('label', 'text', (c) => c.notNull())
		.addColumn('coolant', 'text', (c) => c.notNull())
		.addColumn('channel_diameter_mm', float(db), (c) => c.notNull())
		.addColumn('nominal_flow_lpm', float(db), (c) => c.notNull())
		.addColumn('active', 'integer', (c) => c.notNull().defaultTo(1))
		.addColumn('created_by', 'text', (c) => c.references('users.id'))
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addCheckConstraint('cooling_circuits_half_check', sql`half in ('cover','ejector')`)
		.addCheckConstraint('cooling_circuits_coolant_check', sql`coolant in ('water','oil')`)
		.addCheckConstraint(
			'cooling_circuits_sizes_check',
			sql`channel_diameter_mm > 0 and nominal_flow_lpm > 0`
		)
		.addUniqueConstraint('cooling_circuits_label', ['die_id', 'label'])
		.execute();

	await db.schema
		.createTable('cooling_checks')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('circuit_id', 'integer', (c) => c.notNull().references('cooling_circuits.id'))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('checked_at', 'text', (c) => c.notNull())
		.addColumn('checked_by', 'text', (c) => c.references('users.id'))
		.addColumn('measured_flow_lpm', float(db), (c) => c.notNull())
		.addColumn('inlet_c', float(db), (c) => c.notNull())
		.addColumn('outlet_c', float(db), (c) => c.notNull())
		.addColumn('supply_pressure_bar', float(db))
		.addColumn('leak_test', 'text', (c) => c.notNull())
		.addColumn('notes', 'text')
		.addColumn('oil_density_kg_m3', float(db))
		.addColumn('oil_viscosity_mpa_s', float(db))
		.addColumn('oil_specific_heat_j_kgk', float(db))
		.addCheckConstraint('cooling_checks_leak_check', sql`leak_test in ('pass','fail')`)
		.addCheckConstraint('cooling_checks_flow_check', sql`measured_flow_lpm >= 0`)
		.execute();
	await db.schema
		.createIndex('cooling_checks_circuit')
		.on('cooling_checks')
		.columns(['circuit_id', 'checked_at'])
		.execute();
	await db.schema
		.createIndex('cooling_checks_die')
		.on('cooling_checks')
		.columns(['die_id', 'checked_at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const table of [
		'cooling_checks',
		'cooling_circuits',
		'photos',
		'surface_inspections',
		'job_service_tasks',
		'toolroom_jobs'
	]) {
		await db.schema.dropTable(table).execute();
	}
}
