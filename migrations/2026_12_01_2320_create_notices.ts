import { sql, type Kysely } from 'kysely';
import { autoId } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Service notice outbox: one `notices` row per item under a unique key (die, task, cycle, state),
// one `notice_deliveries` row per (item, recipient) with its own state and back-off, and one
// `notice_digests` row per e-mail the relay accepted.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('notices')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('notice_key', 'text', (c) => c.notNull().unique())
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('level', 'text', (c) => c.notNull())
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('subject', 'text', (c) => c.notNull())
		.addColumn('payload', 'text', (c) => c.notNull().defaultTo('{}'))
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addCheckConstraint('notices_kind_check', sql`kind in ('service','life','job_completed')`)
		.addCheckConstraint(
			'notices_level_check',
			sql`level in ('overdue','due','coming_up','life_100','life_90','ready_again')`
		)
		.execute();

	await db.schema
		.createTable('notice_deliveries')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('notice_id', 'integer', (c) =>
			c.notNull().references('notices.id').onDelete('cascade')
		)
		.addColumn('recipient', 'text', (c) => c.notNull())
		.addColumn('user_id', 'text', (c) => c.references('users.id'))
		.addColumn('state', 'text', (c) => c.notNull().defaultTo('pending'))
		.addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('last_error', 'text')
		.addColumn('next_attempt_at', 'text', (c) => c.notNull())
		.addColumn('digest_id', 'text')
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addColumn('sent_at', 'text')
		.addCheckConstraint('notice_deliveries_state_check', sql`state in ('pending','sent','failed')`)
		.addUniqueConstraint('notice_deliveries_item_recipient', ['notice_id', 'recipient'])
		.execute();
	// The sender's one query: pending rows whose time has come. Partial, so the index stays the
	// size of the queue while sent rows pile up as history.
	await sql`create index notice_deliveries_pending on notice_deliveries (next_attempt_at) where state = 'pending'`.execute(
		db
	);
	// A sender finds its claimed rows by digest id; only pending rows are ever looked up so.
	await sql`create index notice_deliveries_claim on notice_deliveries (digest_id) where state = 'pending'`.execute(
		db
	);

	await db.schema
		.createTable('notice_digests')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('recipient', 'text', (c) => c.notNull())
		.addColumn('subject', 'text', (c) => c.notNull())
		.addColumn('item_count', 'integer', (c) => c.notNull())
		.addColumn('message_id', 'text')
		.addColumn('sent_at', 'text', (c) => c.notNull())
		.execute();
	await db.schema
		.createIndex('notice_digests_sent')
		.on('notice_digests')
		.column('sent_at')
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('notice_digests').execute();
	await db.schema.dropTable('notice_deliveries').execute();
	await db.schema.dropTable('notices').execute();
}
