import { sql, type Kysely } from 'kysely';
import { autoId, float } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// A question the toolroom lead puts to a die's owner when holding the die "waiting for the
// owner's decision": what is asked, optionally the quoted repair hours and cost, and the owner's
// one answer (approve the repair, order a replacement, retire, or a written reply) with who
// answered and when. One open question per die at a time; an answered question stays as history.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('owner_decisions')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('question', 'text', (c) => c.notNull())
		.addColumn('quoted_hours', float(db))
		.addColumn('quoted_cost', float(db))
		.addColumn('asked_by', 'text', (c) => c.references('users.id'))
		.addColumn('asked_at', 'text', (c) => c.notNull())
		.addColumn('answer', 'text')
		.addColumn('answer_text', 'text')
		.addColumn('answered_by', 'text', (c) => c.references('users.id'))
		.addColumn('answered_at', 'text')
		.addCheckConstraint(
			'owner_decisions_answer_check',
			sql`answer is null or answer in ('approve_repair','order_replacement','retire','write_back')`
		)
		.execute();
	await sql`create unique index owner_decisions_one_open on owner_decisions (die_id) where answer is null`.execute(
		db
	);
	await db.schema
		.createIndex('owner_decisions_die')
		.on('owner_decisions')
		.columns(['die_id', 'asked_at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('owner_decisions').execute();
}
