// Issue 14, item 19: an alloy's new expected life shows which dies change state before it is
// saved, and the audit log reads back who, when, what, before → after.
import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { dieFormSchema } from '../../src/lib/schemas/die';
import { createDie } from '../../src/lib/server/dies/die-write';
import { lifeState, previewAlloyLifeChange } from '../../src/lib/server/settings/alloy-impact';
import { describeChanges, listAudit, writeAudit } from '../../src/lib/server/audit';

let db: DB;
let alloyId: number;
const admin = 'admin-1';

async function die(number: string, totalShots: number, ownLife: number | null = null) {
	const form = dieFormSchema.parse({
		number,
		partName: `Part of ${number}`,
		customerId: 1,
		alloyId,
		process: 'cold_chamber',
		cavities: 1,
		projectedAreaCm2: 100
	});
	expect(await createDie(db, form, admin, '2026-01-01T00:00:00.000Z')).toEqual({
		ok: true,
		number
	});
	await db
		.updateTable('dies')
		.set({ total_shots: totalShots, expected_life_shots: ownLife })
		.where('number', '=', number)
		.execute();
}

beforeEach(async () => {
	db = await openTestDatabase();
	await db.insertInto('customers').values({ code: 'ACME', name: 'Acme Pumps' }).execute();
	await db
		.insertInto('users')
		.values({
			id: admin,
			email: 'a@p.test',
			name: 'Ada Admin',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	alloyId = (
		await db.selectFrom('alloys').select('id').where('code', '=', 'A380').executeTakeFirstOrThrow()
	).id;
	await db
		.updateTable('alloys')
		.set({ expected_life_shots: 100_000 })
		.where('id', '=', alloyId)
		.execute();
});

describe('item 19: alloy life change preview', () => {
	test('life bands as for service tasks: 90 % coming up, 100 % due, 110 % overdue', () => {
		expect(lifeState(89_999, 100_000)).toBe('on_track');
		expect(lifeState(90_000, 100_000)).toBe('coming_up');
		expect(lifeState(100_000, 100_000)).toBe('due');
		expect(lifeState(110_000, 100_000)).toBe('overdue');
	});

	test('100 000 → 80 000 shots: only the dies whose band moves are listed', async () => {
		await die('D-0001', 50_000); // 50 % → 62.5 %: on track both times
		await die('D-0002', 75_000); // 75 % → 93.75 %: on track → coming up
		await die('D-0003', 85_000); // 85 % → 106.25 %: on track → due
		await die('D-0004', 95_000); // 95 % → 118.75 %: coming up → overdue
		await die('D-0005', 95_000, 200_000); // own expected life: not affected
		const preview = await previewAlloyLifeChange(db, alloyId, 80_000);
		expect(preview).toEqual({
			before: 100_000,
			after: 80_000,
			dies: 4,
			changes: [
				{
					number: 'D-0002',
					partName: 'Part of D-0002',
					totalShots: 75_000,
					from: 'on_track',
					to: 'coming_up'
				},
				{
					number: 'D-0003',
					partName: 'Part of D-0003',
					totalShots: 85_000,
					from: 'on_track',
					to: 'due'
				},
				{
					number: 'D-0004',
					partName: 'Part of D-0004',
					totalShots: 95_000,
					from: 'coming_up',
					to: 'overdue'
				}
			]
		});
	});
});

describe('item 19: the audit log page reads who, when, what, before → after', () => {
	test('newest first, with the actor’s name and the changed fields only', async () => {
		await writeAudit(
			db,
			{ userId: admin, action: 'token.create', detail: { id: 4 } },
			'2026-12-01T08:00:00.000Z'
		);
		await writeAudit(
			db,
			{
				userId: admin,
				action: 'alloy.update',
				detail: {
					alloy: 'A380',
					before: { expectedLifeShots: 100_000, name: 'A380' },
					after: { expectedLifeShots: 80_000, name: 'A380' }
				}
			},
			'2026-12-02T09:30:00.000Z'
		);
		await writeAudit(db, { action: 'notice.run', detail: {} }, '2026-12-02T06:00:00.000Z');
		const { rows, total } = await listAudit(db, { page: 1, size: 50 });
		expect(total).toBe(3);
		expect(rows.map((r) => [r.at, r.who, r.action])).toEqual([
			['2026-12-02T09:30:00.000Z', 'Ada Admin (a@p.test)', 'alloy.update'],
			['2026-12-02T06:00:00.000Z', 'Castellan', 'notice.run'],
			['2026-12-01T08:00:00.000Z', 'Ada Admin (a@p.test)', 'token.create']
		]);
		expect(rows[0].changes).toEqual(['expectedLifeShots: 100000 → 80000']);
		expect(rows[0].detail).toBe('{"alloy":"A380"}');
		expect(rows[2].changes).toEqual([]);
		expect(rows[2].detail).toBe('{"id":4}');
		const alloys = await listAudit(db, { page: 1, size: 50, action: 'alloy' });
		expect(alloys.rows.map((r) => r.action)).toEqual(['alloy.update']);
		expect(describeChanges({ before: { a: null }, after: { a: 2 } })).toEqual(['a: — → 2']);
	});
});
