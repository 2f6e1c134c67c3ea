import type { Kysely } from 'kysely';

// A running register import says it is alive in its draft row (time, ISO-8601 UTC), with its
// progress: when several app processes share one PostgreSQL database, the page that polls may be
// served by a process other than the one writing, and must tell "running elsewhere" from "the
// process that ran it stopped".

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('import_drafts').addColumn('heartbeat_at', 'text').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('import_drafts').dropColumn('heartbeat_at').execute();
}
