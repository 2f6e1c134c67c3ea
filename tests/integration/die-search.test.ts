import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { dieFormSchema, dieListQuerySchema } from '../../src/lib/schemas/die';
import { createDie } from '../../src/lib/server/dies/die-write';
import { listDies } from '../../src/lib/server/dies/register';
import { findSingleDie } from '../../src/lib/server/dies/search';
import { dieApiView } from '../../src/lib/server/dies/api-view';
import { viewFor } from '../../src/lib/server/owner/customer-fields';

// The header's die search: what people type (issue 13: `D0138`, `d 138`, `138`, `D-138`,
// `D 138`, part numbers) opens the die on a single hit; the register list finds it too.

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
	expect(await createDie(db, form, 'admin-1', '2026-01-01T00:00:00.000Z')).toEqual({
		ok: true,
		number
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
	await die('D-0138', 1, 'BRK-4966', 'Impeller housing');
	await die('D-1380', 1, 'BRK-4138', 'Pump cover');
	await die('D-0007', 2, 'LUM-4049', 'Lamp bezel');
	await die('D-0008', 2, 'LUM-4056', 'Lamp bezel');
});

describe('findSingleDie', () => {
	test.each(['D-0138', 'D0138', 'd 138', '138', '0138', 'D-138', 'D 138', ' d-0138 '])(
		'%s opens D-0138 even though other dies contain 138',
		async (typed) => {
			expect(await findSingleDie(db, typed, plant)).toBe('D-0138');
		}
	);

	test('a part number opens its die, typed with or without the dash', async () => {
		expect(await findSingleDie(db, 'BRK-4138', plant)).toBe('D-1380');
		expect(await findSingleDie(db, 'brk4138', plant)).toBe('D-1380');
		expect(await findSingleDie(db, 'lum 4049', plant)).toBe('D-0007');
	});

	test('a single text hit opens the die; several hits or none open nothing', async () => {
		expect(await findSingleDie(db, 'impeller', plant)).toBe('D-0138');
		expect(await findSingleDie(db, 'bezel', plant)).toBeNull();
		expect(await findSingleDie(db, 'no such thing', plant)).toBeNull();
		expect(await findSingleDie(db, '   ', plant)).toBeNull();
	});

	test("a customer-bound search never names another owner's die", async () => {
		expect(await findSingleDie(db, '7', { customerId: 1 })).toBeNull();
		expect(await findSingleDie(db, '7', { customerId: 2 })).toBe('D-0007');
	});
});

describe('the register list reads typed die numbers the same way', () => {
	test('D 138 lists D-0138 (and nothing that only shares digits with the normalised form)', async () => {
		const list = await listDies(db, dieListQuerySchema.parse({ q: 'D 138' }), plant);
		expect(list.rows.map((r) => r.number)).toEqual(['D-0138']);
	});
	test('a part number without its dash lists its die', async () => {
		const list = await listDies(db, dieListQuerySchema.parse({ q: 'lum4056' }), plant);
		expect(list.rows.map((r) => r.number)).toEqual(['D-0008']);
	});
});

// Issue 15 item 5: the register shows and sorts by part number, and the API's die answer carries
// it. The expected orders are written out by hand from the dies above plus two more.
describe('part numbers in the register', () => {
	beforeEach(async () => {
		await die('D-0009', 1, 'brk-4500', 'Seal carrier');
		await die('D-0010', 1, '', 'Pump foot');
	});
	const list = (q: Record<string, string>) => listDies(db, dieListQuerySchema.parse(q), plant);

	test('each row carries its part number; a die without one has null', async () => {
		const { rows } = await list({ owner: '' });
		expect(rows.map((r) => [r.number, r.partNumber])).toEqual([
			['D-0007', 'LUM-4049'],
			['D-0008', 'LUM-4056'],
			['D-0009', 'brk-4500'],
			['D-0010', null],
			['D-0138', 'BRK-4966'],
			['D-1380', 'BRK-4138']
		]);
	});

	test('sorting by part number ignores case and puts dies without one last, both ways', async () => {
		// By hand: BRK-4138 < brk-4500 (as BRK-4500) < BRK-4966 < LUM-4049 < LUM-4056, then none.
		// A case-sensitive sort would put the lower-case brk-4500 after the LUM numbers.
		expect((await list({ sort: 'partNumber' })).rows.map((r) => r.number)).toEqual([
			'D-1380',
			'D-0009',
			'D-0138',
			'D-0007',
			'D-0008',
			'D-0010'
		]);
		expect((await list({ sort: 'partNumber', dir: 'desc' })).rows.map((r) => r.number)).toEqual([
			'D-0008',
			'D-0007',
			'D-0138',
			'D-0009',
			'D-1380',
			'D-0010'
		]);
	});

	test('an unknown sort key falls back to the die number', async () => {
		expect((await list({ sort: 'part_number' })).rows.map((r) => r.number)).toEqual([
			'D-0007',
			'D-0008',
			'D-0009',
			'D-0010',
			'D-0138',
			'D-1380'
		]);
	});

	test('the API die answer names the part number, for the plant and for the owner', async () => {
		const { rows } = await list({ q: 'D-0007' });
		const view = dieApiView(rows[0]);
		expect(view).toMatchObject({ number: 'D-0007', part: 'Lamp bezel', partNumber: 'LUM-4049' });
		expect(viewFor('customer', 'die', view)).toMatchObject({ partNumber: 'LUM-4049' });
	});
});
