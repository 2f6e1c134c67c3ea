import { sql, type Kysely } from 'kysely';
import { autoId } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Invitations of tooling-owner users: a one-time link (only its sha256 is kept) that lets the
// invited person set a password and get a `customer` account bound to one customer.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('invitations')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('customer_id', 'integer', (c) => c.notNull().references('customers.id'))
		.addColumn('email', 'text', (c) => c.notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('created_by', 'text', (c) => c.references('users.id'))
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addColumn('expires_at', 'text', (c) => c.notNull())
		.addColumn('used_at', 'text')
		.addColumn('user_id', 'text', (c) => c.references('users.id'))
		.addColumn('withdrawn_at', 'text')
		.addColumn('mail_state', 'text', (c) => c.notNull().defaultTo('pending'))
		.addColumn('mail_error', 'text')
		.addColumn('mailed_at', 'text')
		.addCheckConstraint(
			'invitations_mail_state_check',
			sql`mail_state in ('pending','sent','failed')`
		)
		.addCheckConstraint('invitations_used_check', sql`(used_at is null) = (user_id is null)`)
		.execute();
	await db.schema
		.createIndex('invitations_customer')
		.on('invitations')
		.columns(['customer_id', 'created_at'])
		.execute();
	await db.schema.createIndex('invitations_email').on('invitations').column('email').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('invitations').execute();
}
