import { sql, type Kysely } from 'kysely';
import { onPostgres, replaceCheck } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Die register import: the column mapping a plant chose (remembered per sheet kind), and the
// uploaded file between preview and commit (parsed cells, fixes, skips, choices, progress).
// Also widens shot_entries.source to take 'opening' (the opening balance a die is imported with).

/**
 * SQLite cannot change a CHECK constraint in place, so the table is rebuilt from its own current
 * definition (whatever columns earlier migrations added), with the source list widened.
 */
async function rebuildSourceCheck(db: Kysely<any>, widen: boolean) {
	if (onPostgres(db)) {
		const sources = ['manual', 'csv', 'api', 'correction', 'seed', ...(widen ? ['opening'] : [])];
		const list = sources.map((v) => `'${v}'`).join(',');
		await replaceCheck(db, 'shot_entries', 'shot_entries_source_check', `source in (${list})`);
		return;
	}
	const table = await sql<{ sql: string }>`
		select sql from sqlite_master where type = 'table' and name = 'shot_entries'`.execute(db);
	const current = table.rows[0]?.sql;
	if (!current) throw new Error('shot_entries is missing');
	const list = /source\s+in\s*\(([^)]*)\)/i.exec(current);
	if (!list) throw new Error('shot_entries has no source check to widen');
	const values = list[1]
		.split(',')
		.map((v) => v.trim())
		.filter((v) => v !== "'opening'");
	if (widen) values.push("'opening'");
	const rebuilt = current
		.replace(list[0], `source in (${values.join(',')})`)
		.replace(/create table\s+("?)shot_entries\1/i, 'create table "shot_entries_rebuild"');
	const extras = await sql<{ sql: string }>`
		select sql from sqlite_master
		 where tbl_name = 'shot_entries' and type in ('index', 'trigger') and sql is not null`.execute(db);
	await sql.raw(rebuilt).execute(db);
	await sql`insert into shot_entries_rebuild select * from shot_entries`.execute(db);
	await sql`drop table shot_entries`.execute(db);
	await sql`alter table shot_entries_rebuild rename to shot_entries`.execute(db);
	for (const e of extras.rows) await sql.raw(e.sql).execute(db);
}

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('import_mappings')
		.addColumn('kind', 'text', (c) => c.primaryKey())
		.addColumn('mapping', 'text', (c) => c.notNull())
		.addColumn('updated_at', 'text', (c) => c.notNull())
		.addColumn('updated_by', 'text', (c) => c.references('users.id'))
		.execute();
	await db.schema
		.createTable('import_drafts')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		.addColumn('file_name', 'text', (c) => c.notNull())
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addColumn('state', 'text', (c) => c.notNull().defaultTo('open'))
		.addColumn('payload', 'text', (c) => c.notNull())
		.addColumn('progress_done', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('progress_total', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('result', 'text')
		.addCheckConstraint(
			'import_drafts_state_check',
			sql`state in ('open','running','done','failed')`
		)
		.execute();
	await rebuildSourceCheck(db, true);
}

export async function down(db: Kysely<any>): Promise<void> {
	await sql`delete from shot_entries where source = 'opening'`.execute(db);
	await rebuildSourceCheck(db, false);
	await db.schema.dropTable('import_drafts').execute();
	await db.schema.dropTable('import_mappings').execute();
}
