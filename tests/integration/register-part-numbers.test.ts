import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { dieFormSchema, dieListQuerySchema } from '../../src/lib/schemas/die';
import { createDie } from '../../src/lib/server/dies/die-write';
import { listDies } from '../../src/lib/server/dies/register';
import { dieApiView } from '../../src/lib/server/dies/api-view';
import { viewFor } from '../../src/lib/server/owner/customer-fields';

// Issue 15 item 5: the register shows, searches and sorts by part number, and the API's die
// answer carries it. The expected orders below are written out by hand from the four dies.

let db: DB;
const plant = { customerId: null };

async function die(number: string, customerId: number, partNumber: string, partName: string) {
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', 'A380')
		.executeTakeFirstOrThrow();
	const form = dieFormSchema.parse({
		number,
		partName,
		partNumber,
		customerId,
		alloyId: alloy.id,
		process: 'cold_chamber',
		cavities: 1,
		projectedAreaCm2: 300
	});
	expect(await createDie(db, form, 'admin-1', '2026-01-01T00:00:00.000Z')).toMatchObject({
		ok: true
	});
}

beforeEach(async () => {
	db = await openTestDatabase();
	await db
		.insertInto('customers')
		.values([
			{ code: 'BRK', name: 'Brookmere Pumps' },
			{ code: 'LUM', name: 'Lumenfold Lighting' }
		])
		.execute();
	await db
		.insertInto('users')
		.values({
			id: 'admin-1',
			email: 'a@p.test',
			name: 'A',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	await die('D-0001', 1, 'brk-0900', 'Impeller housing');
	await die('D-0002', 1, '', 'Pump cover');
	await die('D-0003', 2, 'LUM-4049', 'Lamp bezel');
	await die('D-0004', 2, 'ACM-7000', 'Lamp bezel');
});

const list = (q: Record<string, string>) => listDies(db, dieListQuerySchema.parse(q), plant);

describe('part numbers in the register', () => {
	test('each row carries its part number; a die without one has null', async () => {
		const { rows } = await list({});
		expect(rows.map((r) => [r.number, r.partNumber])).toEqual([
			['D-0001', 'brk-0900'],
			['D-0002', null],
			['D-0003', 'LUM-4049'],
			['D-0004', 'ACM-7000']
		]);
	});

	test('sorting by part number ignores case and puts dies without one last, both ways', async () => {
		// By hand: ACM-7000 < brk-0900 (as BRK-0900) < LUM-4049, then D-0002 (none).
		expect((await list({ sort: 'partNumber' })).rows.map((r) => r.number)).toEqual([
			'D-0004',
			'D-0001',
			'D-0003',
			'D-0002'
		]);
		expect((await list({ sort: 'partNumber', dir: 'desc' })).rows.map((r) => r.number)).toEqual([
			'D-0003',
			'D-0001',
			'D-0004',
			'D-0002'
		]);
	});

	test('an unknown sort key falls back to the die number', async () => {
		expect((await list({ sort: 'part_number' })).rows.map((r) => r.number)).toEqual([
			'D-0001',
			'D-0002',
			'D-0003',
			'D-0004'
		]);
	});

	test('the search finds a die by its part number, with or without the dash', async () => {
		expect((await list({ q: 'ACM-7000' })).rows.map((r) => r.number)).toEqual(['D-0004']);
		expect((await list({ q: 'acm7000' })).rows.map((r) => r.number)).toEqual(['D-0004']);
	});

	test('the API die answer names the part number, for the plant and for the owner', async () => {
		const { rows } = await list({ q: 'D-0003' });
		const view = dieApiView(rows[0]);
		expect(view).toMatchObject({ number: 'D-0003', part: 'Lamp bezel', partNumber: 'LUM-4049' });
		expect(viewFor('customer', 'die', view)).toMatchObject({ partNumber: 'LUM-4049' });
	});
});
