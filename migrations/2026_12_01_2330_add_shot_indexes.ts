import { sql, type Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// The shot ledger list reads newest first across all dies, optionally narrowed to one source or
// one press. Each filter gets an index that ends in counted_at (and, implicitly, the rowid), so
// "newest 50" is an index walk, never a sort of millions of rows. Per-die reads already have
// shot_entries_die_time. The press-run form starts from a die's last counter reading; a partial
// index finds it without walking every entry of a die that is counted without counters.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createIndex('shot_entries_time')
		.on('shot_entries')
		.column('counted_at')
		.execute();
	await db.schema
		.createIndex('shot_entries_source_time')
		.on('shot_entries')
		.columns(['source', 'counted_at'])
		.execute();
	await db.schema
		.createIndex('shot_entries_machine_time')
		.on('shot_entries')
		.columns(['machine_id', 'counted_at'])
		.execute();
	await sql`create index shot_entries_die_counter on shot_entries (die_id, counted_at)
		where counter_end is not null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropIndex('shot_entries_die_counter').execute();
	await db.schema.dropIndex('shot_entries_machine_time').execute();
	await db.schema.dropIndex('shot_entries_source_time').execute();
	await db.schema.dropIndex('shot_entries_time').execute();
}
