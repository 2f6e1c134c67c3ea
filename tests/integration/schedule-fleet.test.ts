import { beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { conditionalSurvival } from '../../src/lib/calc/weibull';
import { fitFleetByFamily } from '../../src/lib/server/schedule/fleet-fit';
import { runOrderCheck } from '../../src/lib/server/schedule/order-check';
import { addTask, NOW, openScheduleDb } from './schedule-support';

let db: DB;
beforeEach(async () => {
	db = await openScheduleDb();
});

/** Dies of one alloy with the given totals (a register row, not ledger entries). */
async function fleet(alloy: string, retired: number[], running: number[]) {
	const a = (
		await db.selectFrom('alloys').select('id').where('code', '=', alloy).executeTakeFirstOrThrow()
	).id;
	let n = 0;
	for (const [list, status] of [
		[retired, 'retired'],
		[running, 'running']
	] as const) {
		for (const shots of list) {
			await db
				.insertInto('dies')
				.values({
					number: `F-${alloy}-${n++}`,
					part_name: 'Fleet part',
					customer_id: 1,
					alloy_id: a,
					process: 'cold_chamber',
					cavities: 1,
					projected_area_cm2: 100,
					status,
					total_shots: shots
				})
				.execute();
		}
	}
}

describe('fleet life statistics per alloy family', () => {
	test('retired dies are failures, the others suspensions — NIST/SEMATECH §8.4.1.3 example', async () => {
		// The handbook's data as shots: failures 54 … 386, ten units still running at 500.
		// The fixture plant's brass die CU-1 (19 500 shots, in service) is one more suspension, so
		// the check uses a family of its own: move CU-1 out of copper first.
		await db.updateTable('dies').set({ alloy_id: 1 }).where('number', '=', 'CU-1').execute();
		await fleet('CW617N', [54, 187, 216, 240, 244, 335, 361, 373, 375, 386], Array(10).fill(500));
		const copper = (await fitFleetByFamily(db)).find((f) => f.family === 'copper')!;
		expect(copper.failures).toBe(10);
		expect(copper.suspensions).toBe(10);
		expect(copper.reason).toBeNull();
		expect(copper.fit!.shape).toBeCloseTo(1.7208, 3);
		expect(copper.fit!.scale).toBeCloseTo(606.528, 1);
		expect(copper.fit!.logLikelihood).toBeCloseTo(-75.135, 2);
	});

	test('too few failures: no fit, and a plain reason', async () => {
		await fleet('AZ91D', [150_000, 180_000], [90_000]);
		const fits = await fitFleetByFamily(db);
		const mg = fits.find((f) => f.family === 'magnesium')!;
		expect(mg.fit).toBeNull();
		expect(mg.reason).toBe(
			'Only 2 magnesium dies have been retired; at least 3 are needed for a fit.'
		);
		const zinc = fits.find((f) => f.family === 'zinc')!;
		expect(zinc).toMatchObject({ failures: 0, fit: null });
		expect(zinc.reason).toBe(
			'No zinc die has been retired yet, so there are no failures to fit a life distribution to.'
		);
	});
});

describe('order check', () => {
	test('shots, press hours and the first limit that blocks', async () => {
		await addTask(db, 'Z-1', { kind: 'stress_relief', intervalShots: 25_000, leftShots: 1_500 });
		const r = await runOrderCheck(
			db,
			{ die: 'z-1', parts: 4000, scrapPct: 0, press: 'HC-20', shotsPerHour: 250 },
			{ customerId: null },
			NOW
		);
		if (!r.ok) throw new Error(r.message);
		const a = r.answer;
		// 4 000 parts / 2 cavities = 2 000 shots; 8 h at 250 shots/h. The stress relief is due after
		// 1 500 of them, so the run needs the service first: a warning (not a green tick) with the
		// 1 500 shots left as its number.
		expect(a.shotsNeeded).toBe(2000);
		expect(a.pressHours).toBe(8);
		expect(a.verdict).toBe('warning');
		expect(a.reasons).toMatchObject([{ code: 'service_due', level: 'warn', number: 1500 }]);
		expect(a.nextService).toEqual({
			kind: 'stress_relief',
			label: 'Stress relief',
			shotsRemaining: 1500
		});
		expect(a.shotsToEndOfLife).toBe(400_000);
		// 100 cm² × 150 bar / 100 × 1.1 = 165 kN against HC-20's 1 961 kN.
		expect(a.clamp.requiredKn).toBeCloseTo(165, 6);
		expect(a.clamp).toMatchObject({ availableKn: 1961, fits: true, metalPressureBar: 150 });
		expect(a.survival).toEqual({
			probability: null,
			reason:
				'No zinc die has been retired yet, so there are no failures to fit a life distribution to.'
		});
	});

	test('the default rate is the middle of the alloy’s range; a press of the wrong chamber is named', async () => {
		const r = await runOrderCheck(
			db,
			{ die: 'A-1', parts: 1200, scrapPct: 4, press: 'HC-20' },
			{ customerId: null },
			NOW
		);
		if (!r.ok) throw new Error(r.message);
		expect(r.answer.shotsPerHour).toBe(120);
		expect(r.answer.rateIsDefault).toBe(true);
		// 1 200 / (1 × 0.96) = 1 250 shots.
		expect(r.answer.shotsNeeded).toBe(1250);
		expect(r.answer.verdict).toBe('blocked');
		expect(r.answer.blocks.map((f) => f.code)).toEqual([
			'chamber_process',
			'chamber_alloy',
			'clamp_force'
		]);
		expect(r.answer.clamp.fits).toBe(false);
	});

	test('the survival probability comes from the family fit at the die’s age', async () => {
		await fleet('A380', [90_000, 110_000, 125_000, 140_000, 160_000], [20_000, 60_000, 80_000]);
		const r = await runOrderCheck(
			db,
			{ die: 'A-1', parts: 10_000, scrapPct: 0 },
			{ customerId: null },
			NOW
		);
		if (!r.ok) throw new Error(r.message);
		const al = (await fitFleetByFamily(db)).find((f) => f.family === 'aluminium')!;
		const s = r.answer.survival;
		if (s.probability === null) throw new Error(s.reason);
		expect(s.probability).toBeCloseTo(
			conditionalSurvival(50_000, 10_000, al.fit!.shape, al.fit!.scale),
			12
		);
		expect(s.probability).toBeGreaterThan(0.5);
		expect(s.probability).toBeLessThan(1);
	});

	test('an unknown die or press is named', async () => {
		expect(
			await runOrderCheck(db, { die: 'D-9', parts: 1, scrapPct: 0 }, { customerId: null }, NOW)
		).toEqual({
			ok: false,
			field: 'die',
			message: 'There is no die D-9.'
		});
		expect(
			await runOrderCheck(
				db,
				{ die: 'Z-1', parts: 1, scrapPct: 0, press: 'NOPE' },
				{ customerId: null },
				NOW
			)
		).toMatchObject({
			ok: false,
			field: 'press'
		});
	});
});
