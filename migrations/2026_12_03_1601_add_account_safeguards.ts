import { sql, type Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Admin safeguards: a password set by an admin must be changed at the next sign-in (existing
// accounts keep theirs: 0), API tokens may expire (existing ones never do: null), and the audit
// log is read newest first on /admin/audit.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.alterTable('users')
		.addColumn('must_change_password', 'integer', (c) => c.notNull().defaultTo(0))
		.execute();
	await db.schema.alterTable('api_tokens').addColumn('expires_at', 'text').execute();
	await sql`create index if not exists audit_log_at on audit_log (at desc, id desc)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await sql`drop index if exists audit_log_at`.execute(db);
	await db.schema.alterTable('api_tokens').dropColumn('expires_at').execute();
	await db.schema.alterTable('users').dropColumn('must_change_password').execute();
}
