import { beforeEach, describe, expect, test } from 'vitest';
import { resolvePeriod } from '../../src/lib/calc/statement-period';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { issueStatement } from '../../src/lib/server/owner/period-statement';

// Kysely write transactions queue on both engines (db/write-transaction.ts). SQLite runs one
// writer at a time anyway; on PostgreSQL the test database's pool has several connections, so
// without the advisory lock these concurrent read-check-writes would both read the same last
// number and the second insert would break the unique reference.

let db: DB;
let customer: { id: number; code: string };
// 2 July 2026 in UTC, the plant's zone when none is set: references are ST-ACME-20260702-nn.
const NOW = '2026-07-02T12:00:00.000Z';

beforeEach(async () => {
	db = await openTestDatabase();
	const row = await db
		.insertInto('customers')
		.values({ code: 'ACME', name: 'Acme' })
		.returning('id')
		.executeTakeFirstOrThrow();
	customer = { id: row.id, code: 'ACME' };
});

describe('concurrent write transactions', () => {
	test('six statements issued at once get the running numbers 01 to 06, each once', async () => {
		const months = [1, 2, 3, 4, 5, 6].map((month) =>
			resolvePeriod({ kind: 'month', year: 2026, month })
		);
		const issued = await Promise.all(months.map((p) => issueStatement(db, customer, p, null, NOW)));
		expect(issued.map((s) => s.reference).sort()).toEqual([
			'ST-ACME-20260702-01',
			'ST-ACME-20260702-02',
			'ST-ACME-20260702-03',
			'ST-ACME-20260702-04',
			'ST-ACME-20260702-05',
			'ST-ACME-20260702-06'
		]);
	});

	test('the same period asked for four times at once is one statement', async () => {
		const q2 = resolvePeriod({ kind: 'quarter', year: 2026, quarter: 2 });
		const issued = await Promise.all(
			[0, 1, 2, 3].map(() => issueStatement(db, customer, q2, null, NOW))
		);
		expect(new Set(issued.map((s) => s.reference))).toEqual(new Set(['ST-ACME-20260702-01']));
		const rows = await db.selectFrom('statements').select('reference').execute();
		expect(rows).toEqual([{ reference: 'ST-ACME-20260702-01' }]);
	});
});
