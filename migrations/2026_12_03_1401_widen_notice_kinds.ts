import { sql, type Kysely } from 'kysely';
import { autoId, onPostgres, replaceCheck } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// The outbox learns one more kind of item: a die moved by hand to another state ("die_state"),
// told to the production planners, with the level "not_bookable" when the new state blocks
// press bookings (and "ready_again" when it frees them). SQLite cannot change a CHECK constraint
// in place, so `notices` is rebuilt the documented way (sqlite.org/lang_altertable.html, "other
// kinds of table schema changes"): foreign keys off, new table, copy, drop, rename, check, on.
// Every existing row keeps its id, so notice_deliveries still point at the same items.

async function rebuild(db: Kysely<any>, kinds: string[], levels: string[]) {
	const list = (values: string[]) => sql.raw(values.map((v) => `'${v}'`).join(','));
	if (onPostgres(db)) {
		const quoted = (values: string[]) => values.map((v) => `'${v}'`).join(',');
		await replaceCheck(db, 'notices', 'notices_kind_check', `kind in (${quoted(kinds)})`);
		await replaceCheck(db, 'notices', 'notices_level_check', `level in (${quoted(levels)})`);
		return;
	}
	await sql`pragma foreign_keys = off`.execute(db);
	try {
		await db.transaction().execute(async (trx) => {
			await trx.schema
				.createTable('notices_rebuilt')
				.addColumn('id', 'integer', autoId(db))
				.addColumn('notice_key', 'text', (c) => c.notNull().unique())
				.addColumn('kind', 'text', (c) => c.notNull())
				.addColumn('level', 'text', (c) => c.notNull())
				.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
				.addColumn('subject', 'text', (c) => c.notNull())
				.addColumn('payload', 'text', (c) => c.notNull().defaultTo('{}'))
				.addColumn('created_at', 'text', (c) => c.notNull())
				.addCheckConstraint('notices_kind_check', sql`kind in (${list(kinds)})`)
				.addCheckConstraint('notices_level_check', sql`level in (${list(levels)})`)
				.execute();
			await sql`insert into notices_rebuilt (id, notice_key, kind, level, die_id, subject, payload, created_at)
				select id, notice_key, kind, level, die_id, subject, payload, created_at from notices`.execute(trx);
			await sql`drop table notices`.execute(trx);
			await sql`alter table notices_rebuilt rename to notices`.execute(trx);
			const broken = await sql`pragma foreign_key_check`.execute(trx);
			if (broken.rows.length) throw new Error('Rebuilding notices broke a foreign key.');
		});
	} finally {
		await sql`pragma foreign_keys = on`.execute(db);
	}
}

const OLD_KINDS = ['service', 'life', 'job_completed'];
const OLD_LEVELS = ['overdue', 'due', 'coming_up', 'life_100', 'life_90', 'ready_again'];

export async function up(db: Kysely<any>): Promise<void> {
	await rebuild(db, [...OLD_KINDS, 'die_state'], [...OLD_LEVELS, 'not_bookable']);
}

export async function down(db: Kysely<any>): Promise<void> {
	await db
		.deleteFrom('notices')
		.where((eb) => eb.or([eb('kind', '=', 'die_state'), eb('level', '=', 'not_bookable')]))
		.execute();
	await rebuild(db, OLD_KINDS, OLD_LEVELS);
}
