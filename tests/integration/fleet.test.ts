import { beforeEach, describe, expect, it } from 'vitest';
import { conditionalSurvival, fitWeibull } from '../../src/lib/calc/weibull';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { createDie, changeDieStatus } from '../../src/lib/server/dies/die-write';
import { buildFleetLife, kaplanMeier, survivalAt } from '../../src/lib/server/dies/fleet';
import { recordShots } from '../../src/lib/server/shots/ledger';
import { fitFleetByFamily } from '../../src/lib/server/schedule/fleet-fit';
import type { RetirementReason } from '../../src/lib/domain';

const LEAD = 'lead-0001';
let db: DB;
let customerId: number;

/** Registers a die of the alloy, counts its shots through the ledger, and retires it if asked. */
async function addDie(
	number: string,
	alloyCode: string,
	shots: number,
	retired: boolean | RetirementReason = false
) {
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', alloyCode)
		.executeTakeFirstOrThrow();
	const created = await createDie(
		db,
		{
			number,
			partName: `Part of ${number}`,
			partNumber: '',
			customerId,
			alloyId: alloy.id,
			process: alloyCode.startsWith('ZP') ? 'hot_chamber' : 'cold_chamber',
			cavities: 1,
			projectedAreaCm2: 300,
			hasSlides: false,
			location: '',
			notes: '',
			expectedLifeShots: undefined,
			steel: 'H13'
		},
		LEAD,
		'2025-01-01T00:00:00.000Z'
	);
	expect(created.ok).toBe(true);
	if (shots > 0) {
		const result = await recordShots(
			db,
			[{ die: number, shots, countedAt: '2025-12-01T12:00:00.000Z' }],
			{ userId: LEAD, tokenId: null, customerId: null },
			{ source: 'manual', now: '2026-01-01T00:00:00.000Z' }
		);
		expect(result.ok).toBe(true);
	}
	if (retired) {
		const die = await db
			.selectFrom('dies')
			.select(['id', 'status'])
			.where('number', '=', number)
			.executeTakeFirstOrThrow();
		const why = retired === true ? 'worn_out' : retired;
		expect((await changeDieStatus(db, die, 'retired', 'Retired', LEAD, why)).ok).toBe(true);
	}
}

beforeEach(async () => {
	db = await openTestDatabase();
	await db
		.insertInto('users')
		.values({
			id: LEAD,
			email: 'lead@test',
			name: 'Lead',
			role: 'toolroom_lead',
			password_hash: 'x'
		})
		.execute();
	customerId = (
		await db
			.insertInto('customers')
			.values({ code: 'TESTCO', name: 'Test Castings' })
			.returning('id')
			.executeTakeFirstOrThrow()
	).id;
});

describe('Kaplan–Meier estimate', () => {
	it('matches the NIST/SEMATECH e-Handbook §8.2.1.5 example', () => {
		// 20 units: failures at 10, 32, 56, 98, 122, 181 h; removed unfailed at 50, 100, 125, 150 h;
		// the other 10 still running at 200 h. Handbook: R(10) = 19/20, R(32) = 19/20 × 18/19,
		// R(56) = … × 16/17, R(98) = … × 15/16, R(122) = … × 13/14, R(181) = … × 10/11.
		const steps = kaplanMeier(
			[10, 32, 56, 98, 122, 181],
			[50, 100, 125, 150, ...Array(10).fill(200)]
		);
		const expected = [19 / 20, 18 / 19, 16 / 17, 15 / 16, 13 / 14, 10 / 11].reduce<number[]>(
			(acc, f) => [...acc, (acc.at(-1) ?? 1) * f],
			[]
		);
		expect(steps.map((s) => s.shots)).toEqual([10, 32, 56, 98, 122, 181]);
		expect(steps.map((s) => s.atRisk)).toEqual([20, 19, 17, 16, 14, 11]);
		steps.forEach((s, i) => expect(s.survival).toBeCloseTo(expected[i], 12));
		expect(steps[5].survival).toBeCloseTo(0.6704, 4);
		expect(survivalAt(steps, 5)).toBe(1);
		expect(survivalAt(steps, 60)).toBeCloseTo(expected[2], 12);
	});

	it('keeps a suspension at a failure age at risk for that failure', () => {
		const steps = kaplanMeier([100], [100, 200]);
		expect(steps).toEqual([{ shots: 100, survival: 2 / 3, atRisk: 3, failed: 1 }]);
	});
});

describe('fleet life by alloy family', () => {
	it('counts retired dies as failures and active dies as suspensions, per family', async () => {
		await addDie('D-0901', 'A380', 90_000, true);
		await addDie('D-0902', 'EN-AC-46000', 130_000, true);
		await addDie('D-0903', 'A380', 110_000, true);
		await addDie('D-0904', 'A380', 50_000);
		await addDie('D-0905', 'EN-AC-46000', 0);
		await addDie('D-0906', 'ZP0400', 400_000, true);
		await addDie('D-0907', 'ZP0400', 120_000);

		const fleet = await buildFleetLife(db);
		expect(fleet.map((f) => f.family).sort()).toEqual(['aluminium', 'copper', 'magnesium', 'zinc']);
		const al = fleet.find((f) => f.family === 'aluminium')!;
		expect(al.failures.map((d) => [d.number, d.shots])).toEqual([
			['D-0901', 90_000],
			['D-0903', 110_000],
			['D-0902', 130_000]
		]);
		expect(al.running.map((d) => [d.number, d.shots])).toEqual([
			['D-0904', 50_000],
			['D-0905', 0]
		]);
		// Both aluminium alloys pool into one family; the fit is the same as fitting the grouped data.
		const direct = fitWeibull([90_000, 130_000, 110_000], [50_000, 0]);
		expect(al.fit).not.toBeNull();
		expect(al.fit!.shape).toBeCloseTo(direct.shape, 6);
		expect(al.fit!.scale).toBeCloseTo(direct.scale, 0);
		expect(al.reason).toBeNull();
		expect(al.fit!.b10).toBeLessThan(al.fit!.mean);
		// Chance for D-0904 (50 000 shots) to reach the aluminium expected life of 125 000 shots.
		const d904 = al.running.find((d) => d.number === 'D-0904')!;
		expect(d904.expectedLifeShots).toBe(125_000);
		expect(d904.chanceToExpected).toBeCloseTo(
			conditionalSurvival(50_000, 75_000, direct.shape, direct.scale),
			6
		);
		expect(al.kaplanMeier.map((s) => s.shots)).toEqual([90_000, 110_000, 130_000]);
		expect(al.curve.length).toBeGreaterThan(10);
		expect(al.curve[0]).toEqual({ shots: 0, survival: 1 });
		expect(al.maxShots).toBeGreaterThanOrEqual(130_000);
	});

	it('explains that there are too few retirements to fit, and still shows the data', async () => {
		await addDie('D-0906', 'ZP0400', 400_000, true);
		await addDie('D-0907', 'ZP0400', 120_000);
		const fleet = await buildFleetLife(db);
		const zinc = fleet.find((f) => f.family === 'zinc')!;
		expect(zinc.fit).toBeNull();
		expect(zinc.reason).toMatch(/Only 1 zinc die has been retired/);
		expect(zinc.failures.map((d) => d.number)).toEqual(['D-0906']);
		expect(zinc.running.map((d) => d.number)).toEqual(['D-0907']);
		expect(zinc.running[0].chanceToExpected).toBeNull();
		expect(zinc.kaplanMeier).toEqual([{ shots: 400_000, survival: 0, atRisk: 1, failed: 1 }]);
		expect(zinc.curve).toEqual([]);

		const magnesium = fleet.find((f) => f.family === 'magnesium')!;
		expect(magnesium.fit).toBeNull();
		expect(magnesium.reason).toMatch(/No magnesium die has been retired/);
		expect(magnesium.failures).toEqual([]);
		expect(magnesium.running).toEqual([]);
	});

	it('marks a running die already past its expected life', async () => {
		await addDie('D-0901', 'A380', 90_000, true);
		await addDie('D-0902', 'A380', 130_000, true);
		await addDie('D-0903', 'A380', 110_000, true);
		await addDie('D-0904', 'A380', 140_000);
		const al = (await buildFleetLife(db)).find((f) => f.family === 'aluminium')!;
		const old = al.running.find((d) => d.number === 'D-0904')!;
		expect(old.pastExpected).toBe(true);
		expect(old.chanceToExpected).toBe(1);
	});
});

describe('retirement reasons in the fleet fit', () => {
	// NIST/SEMATECH e-Handbook §8.4.1.3: failures at 54, 187, 216, 240, 244, 335, 361, 373, 375,
	// 386 and ten units removed unfailed at 500 → β̂ = 1.7208, η̂ = 606.528.
	const FAILURES = [54, 187, 216, 240, 244, 335, 361, 373, 375, 386];

	it('right-censors a die retired because its part went obsolete, like one still running', async () => {
		for (const [i, shots] of FAILURES.entries())
			await addDie(`AW-${i}`, 'A380', shots, i % 2 ? 'cracked' : 'worn_out');
		for (let i = 0; i < 9; i++) await addDie(`AR-${i}`, 'A380', 500);
		// The tenth unit at 500 shots was retired, but only because the part went obsolete.
		await addDie('AO-1', 'A380', 500, 'obsolete');
		const al = (await fitFleetByFamily(db)).find((f) => f.family === 'aluminium')!;
		expect(al.failures).toBe(10);
		expect(al.suspensions).toBe(10);
		expect(al.fit!.shape).toBeCloseTo(1.7208, 3); // NIST/SEMATECH §8.4.1.3
		expect(al.fit!.scale).toBeCloseTo(606.528, 1); // NIST/SEMATECH §8.4.1.3
		const page = (await buildFleetLife(db)).find((f) => f.family === 'aluminium')!;
		expect(page.failures).toHaveLength(10);
		expect(page.censored.map((d) => d.number)).toEqual(['AO-1']);
		expect(page.retirements).toEqual({
			worn_out: 5,
			cracked: 5,
			damaged: 0,
			obsolete: 1,
			transferred: 0,
			recalled: 0
		});
	});

	it('would count the same die as a failure if it had worn out (the fit moves)', async () => {
		for (const [i, shots] of FAILURES.entries()) await addDie(`AW-${i}`, 'A380', shots, true);
		for (let i = 0; i < 9; i++) await addDie(`AR-${i}`, 'A380', 500);
		await addDie('AO-1', 'A380', 500, 'worn_out');
		const al = (await fitFleetByFamily(db)).find((f) => f.family === 'aluminium')!;
		expect(al.failures).toBe(11);
		expect(Math.abs(al.fit!.shape - 1.7208)).toBeGreaterThan(0.01);
	});
});
