import { beforeEach, describe, expect, test } from 'vitest';
import {
	migrateToLatest,
	newTestDatabaseTarget,
	openDatabase,
	openTestDatabase,
	type DB
} from '../../src/lib/server/db/connect';
import { dieFormSchema, dieListQuerySchema } from '../../src/lib/schemas/die';
import { changeDieStatus, createDie, updateDie } from '../../src/lib/server/dies/die-write';
import { findDie } from '../../src/lib/server/dies/die-detail';
import { listDies } from '../../src/lib/server/dies/register';
import { recordShots } from '../../src/lib/server/shots/ledger';

let db: DB;
let admin: string;
const query = (over: Record<string, string> = {}) => dieListQuerySchema.parse(over);

async function die(number: string, customerId: number, alloyCode = 'A380') {
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', alloyCode)
		.executeTakeFirstOrThrow();
	const form = dieFormSchema.parse({
		number,
		partName: `Part of ${number}`,
		customerId,
		alloyId: alloy.id,
		process: alloyCode === 'A380' ? 'cold_chamber' : 'hot_chamber',
		cavities: 2,
		projectedAreaCm2: 400
	});
	const result = await createDie(db, form, admin, '2026-01-01T00:00:00.000Z');
	expect(result).toEqual({ ok: true, number });
}

beforeEach(async () => {
	db = await openTestDatabase();
	await db
		.insertInto('customers')
		.values([
			{ code: 'ACME', name: 'Acme Pumps' },
			{ code: 'BOLT', name: 'Bolt Tools' }
		])
		.execute();
	admin = 'admin-1';
	await db
		.insertInto('users')
		.values({
			id: admin,
			email: 'a@p.test',
			name: 'A',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	await die('D-0001', 1);
	await die('D-0002', 1, 'ZP0400');
	await die('D-0003', 2);
});

describe('migrations', () => {
	test('migrate up from empty twice, down, and up again on a file database', async () => {
		const dir = await import('node:fs').then((fs) => fs.mkdtempSync('/tmp/castellan-mig-'));
		// A SQLite file, or on the PostgreSQL pass an empty schema of its own.
		const file = openDatabase(await newTestDatabaseTarget(`${dir}/m.db`));
		const first = await migrateToLatest(file);
		expect(first.length).toBeGreaterThanOrEqual(2);
		expect(await migrateToLatest(file)).toEqual([]);
		const alloys = await file
			.selectFrom('alloys')
			.select(['code', 'expected_life_shots'])
			.execute();
		// NADCA FAQ average tool life by family.
		expect(alloys).toEqual(
			expect.arrayContaining([
				{ code: 'ZP0400', expected_life_shots: 500000 },
				{ code: 'AZ91D', expected_life_shots: 200000 },
				{ code: 'A380', expected_life_shots: 125000 },
				{ code: 'CW617N', expected_life_shots: 20000 }
			])
		);
		await file.destroy();
	});
});

describe('die register', () => {
	test('a new die has exactly one active cover and one active ejector half and its family service plan', async () => {
		const d = (await findDie(db, 'D-0001', { customerId: null }))!;
		const halves = await db
			.selectFrom('die_halves')
			.select(['side', 'active', 'shots'])
			.where('die_id', '=', d.id)
			.orderBy('side')
			.execute();
		expect(halves).toEqual([
			{ side: 'cover', active: 1, shots: 0 },
			{ side: 'ejector', active: 1, shots: 0 }
		]);
		const tasks = await db
			.selectFrom('service_tasks')
			.select('kind')
			.where('die_id', '=', d.id)
			.execute();
		expect(tasks.map((t) => t.kind).sort()).toEqual([
			'cooling_flush',
			'stress_relief',
			'surface_inspection',
			'teardown'
		]);
		await expect(
			db
				.insertInto('die_halves')
				.values({ die_id: d.id, side: 'cover', serial: 'X', installed_at: '2026-01-01' })
				.execute()
		).rejects.toThrow(/UNIQUE|duplicate key/); // SQLite | PostgreSQL wording
	});

	test('a duplicate number, unknown owner or alloy is refused and changes nothing', async () => {
		const form = dieFormSchema.parse({
			number: 'd-0001',
			partName: 'X',
			customerId: 1,
			alloyId: 1,
			process: 'hot_chamber',
			cavities: 1,
			projectedAreaCm2: 10
		});
		expect(await createDie(db, form, admin)).toEqual({
			ok: false,
			field: 'number',
			message: 'Die D-0001 already exists.'
		});
		expect(await createDie(db, { ...form, number: 'D-0009', customerId: 99 }, admin)).toMatchObject(
			{ ok: false, field: 'customerId' }
		);
		expect(await createDie(db, { ...form, number: 'D-0009', alloyId: 99 }, admin)).toMatchObject({
			ok: false,
			field: 'alloyId'
		});
		expect((await db.selectFrom('dies').select('number').execute()).length).toBe(3);
	});

	test('the form schema gives each bad field its own message', () => {
		const r = dieFormSchema.safeParse({
			number: 'd 1',
			partName: '',
			customerId: '',
			alloyId: '0',
			process: 'x',
			cavities: '0',
			projectedAreaCm2: '-5'
		});
		expect(r.success).toBe(false);
		const fields = Object.keys(r.error!.flatten().fieldErrors).sort();
		expect(fields).toEqual([
			'alloyId',
			'cavities',
			'customerId',
			'number',
			'partName',
			'process',
			'projectedAreaCm2'
		]);
	});

	test('edit keeps the counts; a number clash on edit is refused', async () => {
		const d = (await findDie(db, 'D-0001', { customerId: null }))!;
		const form = dieFormSchema.parse({
			number: 'D-0002',
			partName: 'Renamed',
			customerId: 1,
			alloyId: d.alloy_id,
			process: 'cold_chamber',
			cavities: 3,
			projectedAreaCm2: 410
		});
		expect(await updateDie(db, d.id, form, admin)).toMatchObject({ ok: false, field: 'number' });
		expect(await updateDie(db, d.id, { ...form, number: 'D-0001' }, admin)).toEqual({
			ok: true,
			number: 'D-0001'
		});
		expect((await findDie(db, 'D-0001', { customerId: null }))!.cavities).toBe(3);
	});

	test('a die’s own planned rate is kept, and a rate of 0 is refused with a message', async () => {
		const d = (await findDie(db, 'D-0001', { customerId: null }))!;
		const fields = {
			number: 'D-0001',
			partName: d.part_name,
			customerId: 1,
			alloyId: d.alloy_id,
			process: d.process,
			cavities: d.cavities,
			projectedAreaCm2: d.projected_area_cm2
		};
		const zero = dieFormSchema.safeParse({ ...fields, plannedShotsPerHour: '0' });
		expect(zero.success).toBe(false);
		expect(zero.error?.issues.map((i) => [i.path.join('.'), i.message])).toEqual([
			['plannedShotsPerHour', 'The planned rate must be above 0.']
		]);
		const form = dieFormSchema.parse({ ...fields, plannedShotsPerHour: '320' });
		expect(await updateDie(db, d.id, form, admin)).toEqual({ ok: true, number: 'D-0001' });
		expect((await findDie(db, 'D-0001', { customerId: null }))!.shots_per_hour).toBe(320);
		// Left empty on the next edit: back to none (the press's or the alloy's rate applies).
		await updateDie(db, d.id, dieFormSchema.parse(fields), admin);
		expect((await findDie(db, 'D-0001', { customerId: null }))!.shots_per_hour).toBeNull();
	});

	test('status changes are audited with the reason; retired is final', async () => {
		const d = (await findDie(db, 'D-0001', { customerId: null }))!;
		expect(await changeDieStatus(db, d, 'held', 'Porosity complaint', admin)).toEqual({ ok: true });
		const held = (await findDie(db, 'D-0001', { customerId: null }))!;
		// Retiring asks why; without a reason nothing changes.
		expect(await changeDieStatus(db, held, 'retired', 'Cracked through', admin)).toEqual({
			ok: false,
			message: 'Say why the die is retired.'
		});
		expect(await changeDieStatus(db, held, 'retired', 'Cracked through', admin, 'cracked')).toEqual(
			{ ok: true }
		);
		const retired = (await findDie(db, 'D-0001', { customerId: null }))!;
		expect(retired.retired_at).not.toBeNull();
		expect(await changeDieStatus(db, retired, 'ready', 'Oops', admin)).toMatchObject({ ok: false });
		const audit = await db
			.selectFrom('audit_log')
			.select(['action', 'detail'])
			.where('die_id', '=', d.id)
			.where('action', '=', 'die.status')
			.execute();
		expect(audit.map((a) => JSON.parse(a.detail))).toEqual([
			{ from: 'ready', to: 'held', reason: 'Porosity complaint' },
			{ from: 'held', to: 'retired', reason: 'Cracked through', retirementReason: 'cracked' }
		]);
		expect(retired.retirement_reason).toBe('cracked');
	});

	test('search, filters, sort and paging work together; life used follows the alloy', async () => {
		await recordShots(
			db,
			[{ die: 'D-0001', shots: 62500, countedAt: '2026-01-02T00:00:00Z' }],
			{ userId: admin, tokenId: null, customerId: null },
			{ source: 'manual', now: '2026-01-03T00:00:00Z' }
		);
		const all = await listDies(db, query({ sort: 'life', dir: 'desc' }), { customerId: null });
		expect(all.total).toBe(3);
		expect(all.rows[0]).toMatchObject({
			number: 'D-0001',
			totalShots: 62500,
			expectedLifeShots: 125000,
			lifeUsedPct: 50
		});
		expect(
			(await listDies(db, query({ q: 'bolt' }), { customerId: null })).rows.map((r) => r.number)
		).toEqual(['D-0003']);
		expect(
			(await listDies(db, query({ family: 'zinc' }), { customerId: null })).rows.map(
				(r) => r.number
			)
		).toEqual(['D-0002']);
		expect((await listDies(db, query({ q: '%' }), { customerId: null })).total).toBe(0);
		const page2 = await listDies(db, { ...query(), size: 2, page: 2 }, { customerId: null });
		expect(page2.rows.map((r) => r.number)).toEqual(['D-0003']);
	});
});

describe('customer isolation', () => {
	test('a customer scope sees only its own dies in the list and by number', async () => {
		const acme = await listDies(db, query(), { customerId: 1 });
		expect(acme.rows.map((r) => r.number)).toEqual(['D-0001', 'D-0002']);
		expect(await findDie(db, 'D-0003', { customerId: 1 })).toBeUndefined();
		expect(await findDie(db, 'D-0003', { customerId: 2 })).toBeDefined();
		expect((await listDies(db, query({ owner: 'BOLT' }), { customerId: 1 })).total).toBe(0);
	});

	test('a customer-bound actor cannot count shots on another owner’s die', async () => {
		const r = await recordShots(
			db,
			[{ die: 'D-0003', shots: 10 }],
			{ userId: null, tokenId: null, customerId: 1 },
			{ source: 'api' }
		);
		expect(r).toEqual({
			ok: false,
			issues: [{ index: 0, field: 'die', message: 'There is no die D-0003.' }]
		});
	});
});
