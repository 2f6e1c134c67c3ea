/**
 * Text matching that means the same on SQLite and PostgreSQL, for Kysely-built queries.
 *
 * SQLite's `like` ignores ASCII case and has no escape character unless one is named; PostgreSQL's
 * `like` is case-sensitive and treats a backslash as the escape character by default. Searches
 * people type ("d-01", "acme") must find the same rows on both, so every such match goes through
 * here: `like … escape '\'` on SQLite, `ilike … escape '\'` on PostgreSQL, with `%`, `_` and `\`
 * in the typed text matched literally. The test cluster and SQLite both compare bytewise (C
 * locale), and both fold ASCII letters only.
 */
import { sql, type Expression, type Kysely, type RawBuilder } from 'kysely';
import { engineOf } from './connect';

/** `%`, `_` and `\` in typed text, escaped for a `like … escape '\'` pattern. */
export function escapeLike(text: string): string {
	return text.replace(/[\\%_]/g, (c) => '\\' + c);
}

type Column = Expression<string | null>;
// eslint-disable-next-line @typescript-eslint/no-explicit-any
type AnyDb = Kysely<any>;

function likePattern(db: AnyDb, column: Column, pattern: string): RawBuilder<boolean> {
	const op = engineOf(db) === 'postgres' ? sql`ilike` : sql`like`;
	return sql<boolean>`${column} ${op} ${pattern} escape '\\'`;
}

/** True where `column` contains `needle` anywhere, ignoring ASCII case. */
export function containsText(db: AnyDb, column: Column, needle: string): RawBuilder<boolean> {
	return likePattern(db, column, `%${escapeLike(needle)}%`);
}

/** True where `column` starts with `prefix`, ignoring ASCII case. */
export function startsWithText(db: AnyDb, column: Column, prefix: string): RawBuilder<boolean> {
	return likePattern(db, column, `${escapeLike(prefix)}%`);
}

/** True where `column` equals `value`, ignoring ASCII case (SQLite's `collate nocase`). */
export function equalsIgnoringCase(column: Column, value: string): RawBuilder<boolean> {
	return sql<boolean>`lower(${column}) = lower(${value})`;
}

/** `column` for `order by` ignoring ASCII case (SQLite's `collate nocase`). */
export function ignoringCase(column: Column): RawBuilder<string | null> {
	return sql<string | null>`lower(${column})`;
}
