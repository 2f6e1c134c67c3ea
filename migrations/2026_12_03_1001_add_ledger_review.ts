import { sql, type Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Counts you can trust: a half may carry its own expected life (null = the die's); ledger entries
// remember a counter reset and its reason, a plausibility warning and its review, and a void
// (who, when, why). Existing rows need nothing: no reset, no warning, not voided.
// Counter intervals are checked for overlap per die and per press; the partial indexes end in
// counter_end so "intervals ending after this start" is a short index walk.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('die_halves').addColumn('expected_life_shots', 'integer').execute();
	for (const [name, type] of [
		['counter_reset', 'integer not null default 0'],
		['reset_reason', 'text'],
		['warning', 'text'],
		['review_state', 'text'],
		['reviewed_by', 'text'],
		['reviewed_at', 'text'],
		['review_reason', 'text'],
		['voided_at', 'text'],
		['voided_by', 'text'],
		['void_reason', 'text'],
		['replaces_id', 'integer']
	] as const) {
		await sql`alter table shot_entries add column ${sql.raw(name)} ${sql.raw(type)}`.execute(db);
	}
	await sql`create index shot_entries_die_counter_end on shot_entries (die_id, counter_end)
		where counter_end is not null and voided_at is null`.execute(db);
	await sql`create index shot_entries_machine_counter_end on shot_entries (machine_id, counter_end)
		where counter_end is not null and voided_at is null and machine_id is not null`.execute(db);
	await sql`create index shot_entries_to_review on shot_entries (die_id, counted_at)
		where review_state = 'to_review' and voided_at is null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropIndex('shot_entries_to_review').execute();
	await db.schema.dropIndex('shot_entries_machine_counter_end').execute();
	await db.schema.dropIndex('shot_entries_die_counter_end').execute();
	for (const name of [
		'replaces_id',
		'void_reason',
		'voided_by',
		'voided_at',
		'review_reason',
		'reviewed_at',
		'reviewed_by',
		'review_state',
		'warning',
		'reset_reason',
		'counter_reset'
	]) {
		await db.schema.alterTable('shot_entries').dropColumn(name).execute();
	}
	await db.schema.alterTable('die_halves').dropColumn('expected_life_shots').execute();
}
