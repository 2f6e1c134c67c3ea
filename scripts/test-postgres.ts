// npm run test:pg — the integration suite (tests/integration) a second time, on PostgreSQL.
//
// Runs when TEST_DATABASE_URL names a PostgreSQL database (a throw-away cluster's: see the README,
// "Running the tests on PostgreSQL"); says so and does nothing when it is unset, so `npm test`
// works the same on a machine without PostgreSQL. Every test file makes schemas (and a few tests
// whole databases) of their own; what a run leaves behind is dropped before and after it.
// Arguments go to Vitest: `npm run test:pg -- tests/integration/shots-ledger.test.ts`.
import { spawnSync } from 'node:child_process';
import { shownTarget } from './lib/cli';
import { describeDatabase, dropTestLeftovers } from './lib/pg-scratch';

const url = process.env.TEST_DATABASE_URL?.trim();
if (!url) {
	console.log(
		'TEST_DATABASE_URL is not set: the PostgreSQL pass of the integration suite is skipped.'
	);
	process.exit(0);
}
const shown = shownTarget(url);

let about: { collate: string; version: string };
try {
	about = await describeDatabase(url);
} catch (error) {
	console.error(`Cannot reach ${shown}: ${(error as Error).message}`);
	process.exit(1);
}
// C.UTF-8 sorts by code point, which for UTF-8 is the same as bytewise.
if (!/^(c|posix|c\.utf-?8)$/i.test(about.collate)) {
	console.error(
		`${shown} sorts text by the locale ${about.collate}; Castellan compares text bytewise, as ` +
			'SQLite does. Create the test database with `createdb --locale=C --template=template0 …` ' +
			'(or use scripts/pg-cluster.sh).'
	);
	process.exit(1);
}
const before = await dropTestLeftovers(url);
console.log(
	`PostgreSQL pass on ${shown} (PostgreSQL ${about.version})` +
		(before.schemas + before.databases
			? `; dropped ${before.schemas} schemas and ${before.databases} databases an earlier run left.`
			: '.')
);

const extra = process.argv.slice(2);
const files = extra.some((a) => !a.startsWith('-')) ? extra : ['tests/integration', ...extra];
const run = spawnSync('npx', ['vitest', 'run', ...files], {
	stdio: 'inherit',
	env: { ...process.env, CASTELLAN_TEST_ENGINE: 'postgres' }
});

await dropTestLeftovers(url);
process.exit(run.status ?? 1);
