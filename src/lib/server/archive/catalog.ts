// What the archive needs to know about a table, read from the engine's own catalog: SQLite's
// pragma table functions, PostgreSQL's pg_catalog (the current schema, as the app's search_path
// sets it). The one place where export and restore ask engine-specific questions.
import type { SqlSession } from '../db/session';

export interface TableShape {
	/** Column names in declaration order (empty when the table does not exist). */
	columns: string[];
	/** The primary key's columns, in key order. */
	primaryKey: string[];
	/** Single-column foreign keys: the column and the table it points at. */
	references: { column: string; table: string }[];
}

const SQLITE = {
	columns: 'select name, pk from pragma_table_info(?) order by cid',
	references: 'select "from" as "column", "table" as "table" from pragma_foreign_key_list(?)'
};

const POSTGRES = {
	columns: `select a.attname as name,
	                 coalesce((select k.n from unnest(i.indkey::int2[]) with ordinality as k(attnum, n)
	                            where k.attnum = a.attnum), 0) as pk
	            from pg_attribute a
	            left join pg_index i on i.indrelid = a.attrelid and i.indisprimary
	           where a.attrelid = to_regclass(?) and a.attnum > 0 and not a.attisdropped
	           order by a.attnum`,
	references: `select a.attname as "column", t.relname as "table"
	               from pg_constraint c
	               join pg_class t on t.oid = c.confrelid
	               join pg_attribute a on a.attrelid = c.conrelid and a.attnum = c.conkey[1]
	              where c.contype = 'f' and c.conrelid = to_regclass(?)`
};

export async function tableShape(s: SqlSession, table: string): Promise<TableShape> {
	const q = s.engine === 'postgres' ? POSTGRES : SQLITE;
	const cols = await s.all<{ name: string; pk: number }>(q.columns, [table]);
	if (!cols.length) return { columns: [], primaryKey: [], references: [] };
	return {
		columns: cols.map((c) => c.name),
		primaryKey: cols
			.filter((c) => Number(c.pk) > 0)
			.sort((a, b) => Number(a.pk) - Number(b.pk))
			.map((c) => c.name),
		references: await s.all<{ column: string; table: string }>(q.references, [table])
	};
}

/** `"a", "b"`: column names from the catalog, quoted for use in SQL text. */
export const quoted = (names: string[]) => names.map((n) => `"${n}"`).join(', ');
