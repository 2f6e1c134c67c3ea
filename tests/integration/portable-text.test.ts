import { beforeAll, describe, expect, test } from 'vitest';
import { sql } from 'kysely';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import {
	containsText,
	equalsIgnoringCase,
	ignoringCase,
	startsWithText
} from '../../src/lib/server/db/portable';
import { listAudit } from '../../src/lib/server/audit';

// Typed searches find the same rows on SQLite and PostgreSQL: SQLite's `like` ignores ASCII case,
// PostgreSQL's does not and takes a backslash as its escape character. Runs on both engines.

let db: DB;

const NAMES = [
	'Brookmere Pumps',
	'BROOKLINE castings',
	'Lumen_fold 100%',
	'Lumenxfold 1000',
	'a\\b'
];

beforeAll(async () => {
	db = await openTestDatabase();
	await db
		.insertInto('customers')
		.values(NAMES.map((name, i) => ({ code: `C${i}`, name })))
		.execute();
});

async function namesWhere(where: ReturnType<typeof containsText>) {
	const rows = await db
		.selectFrom('customers')
		.select('name')
		.where(where)
		.orderBy('code')
		.execute();
	return rows.map((r) => r.name);
}

describe('portable text matching', () => {
	test('contains ignores ASCII case', async () => {
		expect(await namesWhere(containsText(db, sql`name`, 'brook'))).toEqual([
			'Brookmere Pumps',
			'BROOKLINE castings'
		]);
		expect(await namesWhere(containsText(db, sql`name`, 'CASTING'))).toEqual([
			'BROOKLINE castings'
		]);
	});

	test('%, _ and \\ in typed text match only themselves', async () => {
		// `_` would match the x of "Lumenxfold" and `%` anything, if they were not escaped.
		expect(await namesWhere(containsText(db, sql`name`, 'n_f'))).toEqual(['Lumen_fold 100%']);
		expect(await namesWhere(containsText(db, sql`name`, '0%'))).toEqual(['Lumen_fold 100%']);
		expect(await namesWhere(containsText(db, sql`name`, 'a\\b'))).toEqual(['a\\b']);
	});

	test('starts with ignores case and anchors at the start', async () => {
		expect(await namesWhere(startsWithText(db, sql`name`, 'lumen'))).toEqual([
			'Lumen_fold 100%',
			'Lumenxfold 1000'
		]);
		expect(await namesWhere(startsWithText(db, sql`name`, 'pumps'))).toEqual([]);
	});

	test('equals ignoring case matches the whole value only', async () => {
		expect(await namesWhere(equalsIgnoringCase(sql`name`, 'brookmere pumps'))).toEqual([
			'Brookmere Pumps'
		]);
		expect(await namesWhere(equalsIgnoringCase(sql`name`, 'brookmere'))).toEqual([]);
	});

	test('ordering ignoring case puts "BROOKLINE" before "Brookmere"', async () => {
		// Bytewise, "BR…" < "Br…" either way; lower case decides on the 5th letter: l < m.
		const rows = await db
			.selectFrom('customers')
			.select('name')
			.where('code', 'in', ['C0', 'C1'])
			.orderBy(ignoringCase(sql`name`), 'desc')
			.execute();
		expect(rows.map((r) => r.name)).toEqual(['Brookmere Pumps', 'BROOKLINE castings']);
	});

	test('the audit filter takes the action as a prefix, underscores literally', async () => {
		const at = '2026-01-01T00:00:00.000Z';
		await db
			.insertInto('audit_log')
			.values([
				{ at, action: 'owner.decision_asked', detail: '{}' },
				{ at, action: 'owner.decisionXasked', detail: '{}' },
				{ at, action: 'die.status', detail: '{}' }
			])
			.execute();
		const found = await listAudit(db, { page: 1, size: 10, action: 'OWNER.decision_' });
		expect(found.rows.map((r) => r.action)).toEqual(['owner.decision_asked']);
		expect(found.total).toBe(1);
	});
});
