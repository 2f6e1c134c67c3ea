// The big shot ledger the page-load bench reads: `rows` entries over three years, in time order,
// spread over every die, generated inside the database (SQLite: a recursive CTE; PostgreSQL:
// generate_series) with the ledger's indexes dropped first and rebuilt after, as a bulk load
// would; then the daily roll-up and the die and half totals derived from the entries with the
// same statements on both engines, so everything agrees as recordShots would have left it.
import { sql } from 'kysely';
import { rawHandle, type DB } from '../../src/lib/server/db/connect';

/** The ledger spans three years before this instant. */
export const LEDGER_NOW = '2027-03-01T08:00:00.000Z';
const SPAN_MS = 3 * 365 * 86_400_000;

/** Entry i belongs to die (i mod dies) + 1, press (i mod 7) + 1, at start + slot·step + die·3 s. */
function spacing(rows: number, dies: number) {
	const slots = Math.ceil(rows / dies);
	return {
		start: Math.floor((Date.parse(LEDGER_NOW) - SPAN_MS) / 1000),
		step: Math.floor(SPAN_MS / 1000 / slots)
	};
}

const SOURCE_SQL = `case when i % 50 = 0 then 'api' when i % 31 = 0 then 'manual' else 'csv' end`;

/** The totals recordShots keeps, derived from the entries; portable SQL, run in this order. */
const DERIVED_TOTALS_SQL = [
	`insert into shot_daily (die_id, day, shots)
	 select die_id, substr(counted_at, 1, 10), sum(shots) from shot_entries group by 1, 2`,
	`update dies set
	   total_shots = coalesce((select sum(shots) from shot_daily d where d.die_id = dies.id), 0)`,
	`update die_halves set shots = (select total_shots from dies where dies.id = die_halves.die_id)`,
	`update dies set last_counted_at = (select max(counted_at) from shot_entries e where e.die_id = dies.id)`
];

/** Fills a SQLite bench file (journal off: it is thrown away after the run). */
export function fillLedgerSqlite(db: DB, rows: number, dies: number) {
	const raw = rawHandle(db);
	raw.pragma('journal_mode = OFF');
	raw.pragma('synchronous = OFF');
	raw.pragma('cache_size = -262144');
	const indexes = raw
		.prepare(
			`select name, sql from sqlite_master where type = 'index' and tbl_name = 'shot_entries' and sql is not null`
		)
		.all() as { name: string; sql: string }[];
	for (const i of indexes) raw.exec(`drop index ${i.name}`);
	const { start, step } = spacing(rows, dies);
	raw.transaction(() => {
		raw
			.prepare(
				`with recursive seq(i) as (select 0 union all select i + 1 from seq where i < ? - 1)
				 insert into shot_entries (die_id, machine_id, counted_at, shots, source, created_at)
				 select (i % ?) + 1, (i % 7) + 1,
				        strftime('%Y-%m-%dT%H:%M:%fZ', ? + (i / ?) * ? + (i % ?) * 3, 'unixepoch'),
				        20 + (abs(random()) % 400), ${SOURCE_SQL}, ?
				   from seq`
			)
			.run(rows, dies, start, dies, step, dies, LEDGER_NOW);
	})();
	for (const i of indexes) raw.exec(i.sql);
	raw.transaction(() => {
		for (const statement of DERIVED_TOTALS_SQL) raw.exec(statement);
	})();
	if (process.env.BENCH_ANALYZE === '1') raw.exec('analyze');
	raw.pragma('synchronous = NORMAL');
	raw.pragma('journal_mode = WAL');
}

/**
 * Fills a PostgreSQL bench schema in one transaction, all server-side: nothing but the statement
 * text crosses the wire. As PostgreSQL's "Populating a Database" advises for a bulk load, the
 * ledger's and roll-up's foreign keys and the indexes that back no constraint are dropped first
 * and put back after (the foreign keys re-checked over all rows at once): checked row by row they
 * made the load four times slower.
 */
export async function fillLedgerPostgres(db: DB, rows: number, dies: number) {
	const { start, step } = spacing(rows, dies);
	await db.connection().execute(async (conn) => {
		await sql`set maintenance_work_mem = '256MB'`.execute(conn);
		await conn.transaction().execute(async (tx) => {
			// The commit of a throw-away bench load need not wait for the disk.
			await sql`set local synchronous_commit = off`.execute(tx);
			const foreignKeys = await sql<{ name: string; table: string; definition: string }>`
				select conname as name, conrelid::regclass::text as table,
				       pg_get_constraintdef(oid) as definition
				  from pg_constraint
				 where contype = 'f' and conrelid in ('shot_entries'::regclass, 'shot_daily'::regclass)`.execute(
				tx
			);
			const indexes = await sql<{ name: string; definition: string }>`
				select i.indexname as name, i.indexdef as definition
				  from pg_indexes i
				 where i.schemaname = current_schema() and i.tablename in ('shot_entries', 'shot_daily')
				   and not exists (select 1 from pg_constraint c
				                    where c.conname = i.indexname
				                      and c.connamespace = current_schema()::regnamespace)`.execute(tx);
			for (const f of foreignKeys.rows) {
				await sql.raw(`alter table ${f.table} drop constraint "${f.name}"`).execute(tx);
			}
			for (const i of indexes.rows) await sql.raw(`drop index "${i.name}"`).execute(tx);
			await sql`
				insert into shot_entries (die_id, machine_id, counted_at, shots, source, created_at)
				select (i % ${dies}) + 1, (i % 7) + 1,
				       to_char(to_timestamp(${start}::bigint + (i / ${dies}) * ${step}::bigint + (i % ${dies}) * 3)
				                 at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'),
				       20 + floor(random() * 400)::int, ${sql.raw(SOURCE_SQL)}, ${LEDGER_NOW}
				  from generate_series(0::bigint, ${rows}::bigint - 1) as i`.execute(tx);
			for (const i of indexes.rows) await sql.raw(i.definition).execute(tx);
			for (const statement of DERIVED_TOTALS_SQL) await sql.raw(statement).execute(tx);
			for (const f of foreignKeys.rows) {
				await sql
					.raw(`alter table ${f.table} add constraint "${f.name}" ${f.definition}`)
					.execute(tx);
			}
		});
		await sql`reset maintenance_work_mem`.execute(conn);
	});
}
