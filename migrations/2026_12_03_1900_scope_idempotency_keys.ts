import { sql, type Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Idempotency keys were unique across the whole plant, so one owner's token could learn that
// another's key existed and take predictable keys first. A key now belongs to a scope: the plant
// (staff sessions and plant-wide tokens) or one customer (a customer-bound token). Existing keys
// keep their meaning: entries posted by a customer-bound token move to that customer's scope,
// all others to the plant's.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.alterTable('shot_entries')
		.addColumn('key_scope', 'text', (c) => c.notNull().defaultTo('plant'))
		.execute();
	await sql`update shot_entries set key_scope = 'customer:' || (
			select customer_id from api_tokens where api_tokens.id = shot_entries.token_id)
		where idem_key is not null and token_id in (
			select id from api_tokens where customer_id is not null)`.execute(db);
	await sql`drop index if exists shot_entries_key`.execute(db);
	await sql`create unique index shot_entries_scope_key on shot_entries (key_scope, idem_key)
		where idem_key is not null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await sql`drop index if exists shot_entries_scope_key`.execute(db);
	await sql`create unique index shot_entries_key on shot_entries (idem_key)
		where idem_key is not null`.execute(db);
	await db.schema.alterTable('shot_entries').dropColumn('key_scope').execute();
}
