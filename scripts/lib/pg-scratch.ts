// Scratch PostgreSQL databases and schemas for the test suite's PostgreSQL pass: the tests that
// need a whole database of their own (the backup round trip, two app processes) make one beside
// TEST_DATABASE_URL's, and `npm run test:pg` clears what an interrupted run left behind.
import pg from 'pg';

// Schemas an earlier version of the suite made (t_<pid>_<time>_<n>); the databases the suite makes
// now: openTestDatabase's tdb_test_<pid>_<time>_<n> copied from tdb_template_<n>_<hash>
// (src/lib/server/db/connect.ts), and this file's tdb_<label>_<pid>_<n>.
const TEST_SCHEMAS = String.raw`^t_\d+_[a-z0-9]+_\d+$`;
const SCRATCH_DATABASES = String.raw`^tdb_[a-z]+_[a-z0-9_]+$`;

let made = 0;

/** The same server and credentials as `url`, another database. */
export function databaseUrl(url: string, name: string): string {
	const u = new URL(url);
	u.pathname = `/${name}`;
	return u.toString();
}

async function withClient<T>(url: string, work: (client: pg.Client) => Promise<T>): Promise<T> {
	const client = new pg.Client({ connectionString: url });
	await client.connect();
	try {
		return await work(client);
	} finally {
		await client.end();
	}
}

export interface ScratchDatabase {
	name: string;
	url: string;
	drop(): Promise<void>;
}

/**
 * A new, empty database on TEST_DATABASE_URL's server, made like a production one (from
 * template0, C collation, UTF-8). `label` is lower-case letters, naming the test.
 */
export async function createScratchDatabase(
	baseUrl: string,
	label: string
): Promise<ScratchDatabase> {
	if (!/^[a-z]+$/.test(label)) throw new Error(`Not a plain label: ${label}`);
	const name = `tdb_${label}_${process.pid}_${++made}`;
	await withClient(baseUrl, (c) =>
		c.query(
			`create database ${name} template template0 encoding 'UTF8' lc_collate 'C' lc_ctype 'C'`
		)
	);
	return {
		name,
		url: databaseUrl(baseUrl, name),
		drop: () =>
			withClient(baseUrl, (c) => c.query(`drop database if exists ${name} with (force)`)).then(
				() => undefined
			)
	};
}

/** Drops the schemas and scratch databases test runs left in `url`'s database and server. */
export async function dropTestLeftovers(
	url: string
): Promise<{ schemas: number; databases: number }> {
	return withClient(url, async (c) => {
		const schemas = await c.query<{ name: string }>(
			'select nspname as name from pg_namespace where nspname ~ $1',
			[TEST_SCHEMAS]
		);
		// One statement per schema: dropping hundreds at once runs out of the lock table.
		for (const { name } of schemas.rows) await c.query(`drop schema if exists "${name}" cascade`);
		const databases = await c.query<{ name: string }>(
			'select datname as name from pg_database where datname ~ $1',
			[SCRATCH_DATABASES]
		);
		for (const { name } of databases.rows) {
			await c.query(`drop database if exists "${name}" with (force)`);
		}
		return { schemas: schemas.rows.length, databases: databases.rows.length };
	});
}

/** The database's collation and the server's version, for the test runner's first check. */
export async function describeDatabase(url: string): Promise<{ collate: string; version: string }> {
	return withClient(url, async (c) => {
		const { rows } = await c.query<{ collate: string; version: string }>(
			`select datcollate as collate, current_setting('server_version') as version
			   from pg_database where datname = current_database()`
		);
		return rows[0];
	});
}
