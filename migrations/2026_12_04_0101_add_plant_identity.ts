import { sql, type Kysely } from 'kysely';
import { autoId, float } from './portable';

// What a plant puts on the documents it sends: its name, address, contact, logo and a footer
// line for statements, plus the hourly rate billable toolroom work is charged at (toolroom jobs
// record hours, not money). Existing plants start with empty values: `plantIdentity` shows the
// fallback name until the admin sets one, and a statement without a rate shows hours only.
// Statements issued to owners are recorded under a unique reference so one can be found again.

export async function up(db: Kysely<any>): Promise<void> {
	for (const column of [
		'plant_name',
		'plant_address',
		'contact_email',
		'contact_phone',
		'statement_footer'
	]) {
		await db.schema
			.alterTable('plant_settings')
			.addColumn(column, 'text', (c) => c.notNull().defaultTo(''))
			.execute();
	}
	await db.schema.alterTable('plant_settings').addColumn('logo_file', 'text').execute();
	await db.schema
		.alterTable('plant_settings')
		.addColumn('repair_rate_per_hour', float(db), (c) => c.check(sql`repair_rate_per_hour >= 0`))
		.execute();
	await db.schema
		.alterTable('plant_settings')
		.addColumn('currency', 'text', (c) => c.notNull().defaultTo('EUR'))
		.execute();

	await db.schema
		.createTable('statements')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('reference', 'text', (c) => c.notNull().unique())
		.addColumn('customer_id', 'integer', (c) => c.notNull().references('customers.id'))
		.addColumn('period_kind', 'text', (c) =>
			c.notNull().check(sql`period_kind in ('month', 'quarter', 'year', 'custom')`)
		)
		.addColumn('period_from', 'text', (c) => c.notNull())
		.addColumn('period_to', 'text', (c) => c.notNull())
		.addColumn('issue_day', 'text', (c) => c.notNull())
		.addColumn('seq', 'integer', (c) => c.notNull())
		.addColumn('issued_at', 'text', (c) => c.notNull())
		.addColumn('issued_by', 'text')
		.addUniqueConstraint('statements_customer_day_seq', ['customer_id', 'issue_day', 'seq'])
		.execute();
	await db.schema
		.createIndex('statements_by_customer')
		.on('statements')
		.columns(['customer_id', 'issued_at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('statements').execute();
	for (const column of [
		'currency',
		'repair_rate_per_hour',
		'logo_file',
		'statement_footer',
		'contact_phone',
		'contact_email',
		'plant_address',
		'plant_name'
	]) {
		await db.schema.alterTable('plant_settings').dropColumn(column).execute();
	}
}
