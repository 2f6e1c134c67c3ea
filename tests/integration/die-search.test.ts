import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { dieFormSchema, dieListQuerySchema } from '../../src/lib/schemas/die';
import { createDie } from '../../src/lib/server/dies/die-write';
import { listDies } from '../../src/lib/server/dies/register';
import { findSingleDie } from '../../src/lib/server/dies/search';

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
