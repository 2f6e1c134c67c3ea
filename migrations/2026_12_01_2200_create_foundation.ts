import { sql, type Kysely } from 'kysely';
import { autoId, float, nowText } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Dates are ISO-8601 text in UTC; booleans are 0/1 integers.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('customers')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('code', 'text', (c) => c.notNull().unique())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('contact_email', 'text')
		.addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowText(db)))
		.execute();

	await db.schema
		.createTable('users')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('email', 'text', (c) => c.notNull().unique())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('role', 'text', (c) => c.notNull())
		.addColumn('customer_id', 'integer', (c) => c.references('customers.id'))
		.addColumn('password_hash', 'text', (c) => c.notNull())
		.addColumn('active', 'integer', (c) => c.notNull().defaultTo(1))
		.addColumn('unit_system', 'text', (c) => c.notNull().defaultTo('metric'))
		.addColumn('notices_enabled', 'integer', (c) => c.notNull().defaultTo(1))
		.addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowText(db)))
		.addCheckConstraint(
			'users_role_check',
			sql`role in ('admin','toolroom_lead','toolmaker','scheduler','customer')`
		)
		.addCheckConstraint(
			'users_customer_binding',
			sql`(role = 'customer') = (customer_id is not null)`
		)
		.execute();

	await db.schema
		.createTable('sessions')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		.addColumn('expires_at', 'integer', (c) => c.notNull())
		.execute();
	await db.schema.createIndex('sessions_user').on('sessions').column('user_id').execute();

	await db.schema
		.createTable('sign_in_failures')
		.addColumn('bucket', 'text', (c) => c.primaryKey())
		.addColumn('failures', 'integer', (c) => c.notNull())
		.addColumn('window_started_at', 'integer', (c) => c.notNull())
		.execute();

	await db.schema
		.createTable('api_tokens')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('token_prefix', 'text', (c) => c.notNull())
		.addColumn('scopes', 'text', (c) => c.notNull())
		.addColumn('customer_id', 'integer', (c) => c.references('customers.id'))
		.addColumn('created_by', 'text', (c) => c.references('users.id'))
		.addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowText(db)))
		.addColumn('last_used_at', 'text')
		.addColumn('revoked_at', 'text')
		.execute();

	await db.schema
		.createTable('alloys')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('code', 'text', (c) => c.notNull().unique())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('family', 'text', (c) => c.notNull())
		.addColumn('expected_life_shots', 'integer', (c) => c.notNull())
		.addColumn('density_kg_m3', float(db))
		.addColumn('specific_heat_j_kgk', float(db))
		.addColumn('latent_heat_j_kg', float(db))
		.addColumn('solidus_c', float(db))
		.addColumn('liquidus_c', float(db))
		.addColumn('pour_temp_c', float(db))
		.addColumn('source_note', 'text')
		.addCheckConstraint(
			'alloys_family_check',
			sql`family in ('zinc','magnesium','aluminium','copper')`
		)
		.execute();

	await db.schema
		.createTable('machines')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('name', 'text', (c) => c.notNull().unique())
		.addColumn('chamber', 'text', (c) => c.notNull())
		.addColumn('clamp_force_kn', float(db), (c) => c.notNull())
		.addColumn('max_shot_weight_kg', float(db))
		.addColumn('tie_bar_spacing_mm', float(db))
		.addColumn('status', 'text', (c) => c.notNull().defaultTo('available'))
		.addColumn('notes', 'text')
		.addCheckConstraint('machines_chamber_check', sql`chamber in ('hot','cold')`)
		.execute();

	await db.schema
		.createTable('dies')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('number', 'text', (c) => c.notNull().unique())
		.addColumn('part_name', 'text', (c) => c.notNull())
		.addColumn('part_number', 'text')
		.addColumn('customer_id', 'integer', (c) => c.notNull().references('customers.id'))
		.addColumn('alloy_id', 'integer', (c) => c.notNull().references('alloys.id'))
		.addColumn('process', 'text', (c) => c.notNull())
		.addColumn('cavities', 'integer', (c) => c.notNull())
		.addColumn('projected_area_cm2', float(db), (c) => c.notNull())
		.addColumn('has_slides', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('status', 'text', (c) => c.notNull().defaultTo('ready'))
		.addColumn('location', 'text')
		.addColumn('notes', 'text')
		.addColumn('expected_life_shots', 'integer')
		.addColumn('total_shots', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('last_counted_at', 'text')
		.addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowText(db)))
		.addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(nowText(db)))
		.addColumn('retired_at', 'text')
		.addCheckConstraint(
			'dies_status_check',
			sql`status in ('ready','running','in_toolroom','held','retired')`
		)
		.addCheckConstraint('dies_process_check', sql`process in ('hot_chamber','cold_chamber')`)
		.addCheckConstraint('dies_cavities_check', sql`cavities >= 1`)
		.addCheckConstraint('dies_area_check', sql`projected_area_cm2 > 0`)
		.execute();
	await db.schema
		.createIndex('dies_customer')
		.on('dies')
		.columns(['customer_id', 'number'])
		.execute();
	await db.schema.createIndex('dies_status').on('dies').column('status').execute();

	await db.schema
		.createTable('die_halves')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('side', 'text', (c) => c.notNull())
		.addColumn('serial', 'text', (c) => c.notNull())
		.addColumn('steel', 'text')
		.addColumn('hardness_hrc', float(db))
		.addColumn('shots', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('active', 'integer', (c) => c.notNull().defaultTo(1))
		.addColumn('installed_at', 'text', (c) => c.notNull())
		.addColumn('die_shots_at_install', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('removed_at', 'text')
		.addColumn('removal_reason', 'text')
		.addCheckConstraint('die_halves_side_check', sql`side in ('cover','ejector')`)
		.execute();
	// Exactly one active cover and one active ejector half per die.
	await sql`create unique index die_halves_one_active on die_halves (die_id, side) where active = 1`.execute(
		db
	);

	await db.schema
		.createTable('shot_entries')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('machine_id', 'integer', (c) => c.references('machines.id'))
		.addColumn('counted_at', 'text', (c) => c.notNull())
		.addColumn('shots', 'integer', (c) => c.notNull())
		.addColumn('counter_start', 'integer')
		.addColumn('counter_end', 'integer')
		.addColumn('source', 'text', (c) => c.notNull())
		.addColumn('idem_key', 'text')
		.addColumn('entered_by', 'text', (c) => c.references('users.id'))
		.addColumn('token_id', 'integer', (c) => c.references('api_tokens.id'))
		.addColumn('note', 'text')
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addCheckConstraint(
			'shot_entries_source_check',
			sql`source in ('manual','csv','api','correction','seed')`
		)
		.execute();
	await db.schema
		.createIndex('shot_entries_die_time')
		.on('shot_entries')
		.columns(['die_id', 'counted_at'])
		.execute();
	await sql`create unique index shot_entries_key on shot_entries (idem_key) where idem_key is not null`.execute(
		db
	);

	// Daily roll-up kept in the same transaction as each ledger row, so trailing rates and charts
	// never scan the ledger.
	await db.schema
		.createTable('shot_daily')
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('day', 'text', (c) => c.notNull())
		.addColumn('shots', 'integer', (c) => c.notNull())
		.addPrimaryKeyConstraint('shot_daily_pk', ['die_id', 'day'])
		.execute();

	await db.schema
		.createTable('service_templates')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('family', 'text', (c) => c.notNull())
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('interval_shots', 'integer')
		.addColumn('interval_days', 'integer')
		.addUniqueConstraint('service_templates_family_kind', ['family', 'kind'])
		.execute();

	await db.schema
		.createTable('service_tasks')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('interval_shots', 'integer')
		.addColumn('interval_days', 'integer')
		.addColumn('last_done_at', 'text', (c) => c.notNull())
		.addColumn('last_done_shots', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('active', 'integer', (c) => c.notNull().defaultTo(1))
		.addCheckConstraint(
			'service_tasks_interval_check',
			sql`interval_shots is not null or interval_days is not null`
		)
		.execute();
	await db.schema.createIndex('service_tasks_die').on('service_tasks').column('die_id').execute();

	await db.schema
		.createTable('audit_log')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('at', 'text', (c) => c.notNull())
		.addColumn('user_id', 'text', (c) => c.references('users.id'))
		.addColumn('token_id', 'integer', (c) => c.references('api_tokens.id'))
		.addColumn('action', 'text', (c) => c.notNull())
		.addColumn('die_id', 'integer', (c) => c.references('dies.id'))
		.addColumn('detail', 'text', (c) => c.notNull().defaultTo('{}'))
		.execute();
	await db.schema.createIndex('audit_log_die').on('audit_log').columns(['die_id', 'at']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const table of [
		'audit_log',
		'service_tasks',
		'service_templates',
		'shot_daily',
		'shot_entries',
		'die_halves',
		'dies',
		'machines',
		'alloys',
		'api_tokens',
		'sign_in_failures',
		'sessions',
		'users',
		'customers'
	]) {
		await db.schema.dropTable(table).execute();
	}
}
