import { beforeEach, describe, expect, test } from 'vitest';
import { loadReplacementOutlook } from '../../src/lib/server/dies/replacement';
import { recordShots } from '../../src/lib/server/shots/ledger';
import { hoursFromNow, makeShotPlant, NOW, plant, type ShotPlant } from './shots-fixture';

// A-0001 is an A380 die without a life of its own: 125 000 shots expected (the alloy's), on
// both halves. It takes 14 × 2 000 = 28 000 shots in the last 14 days, so the trailing 28-day
// rate is 28 000 / 28 = 1 000 shots a day. By hand:
//   shots remaining       125 000 − 28 000 = 97 000
//   days to end of life   97 000 / 1 000 = 97
//   projected end of life 2026-06-10 + 97 days: +30 → 07-10, +31 → 08-10, +31 → 09-10 (92),
//                         +5 → 2026-09-15
//   reorder by (84 days)  2026-09-15 − 84: −31 → 08-15, −31 → 07-15, −30 → 06-15 (92 back),
//                         8 days less → 2026-06-23
//   reorder by (30 days)  2026-09-15 − 15 → 08-31, − 15 more → 2026-08-16

let p: ShotPlant;
beforeEach(async () => {
	p = await makeShotPlant();
	for (let day = 1; day <= 14; day++) {
		const r = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 2000, countedAt: hoursFromNow(-24 * day) }],
			plant,
			{ source: 'manual', now: NOW }
		);
		expect(r.ok).toBe(true);
	}
});

describe('replacement outlook', () => {
	test('uses the family default lead time when the die has none of its own', async () => {
		const o = await loadReplacementOutlook(p.db, p.dies.alu, NOW);
		expect(o.shotsRemaining).toBe(97_000);
		expect(o.projectedEndOfLife).toBe('2026-09-15');
		expect(o).toMatchObject({ leadDays: 84, leadDaysFrom: 'family', reorderBy: '2026-06-23' });
		expect(o.reorderDue).toBe(false);
	});

	test("the die's own lead time wins; the plant's family default can be changed", async () => {
		await p.db
			.updateTable('dies')
			.set({ replacement_lead_days: 30 })
			.where('id', '=', p.dies.alu)
			.execute();
		expect(await loadReplacementOutlook(p.db, p.dies.alu, NOW)).toMatchObject({
			leadDays: 30,
			leadDaysFrom: 'die',
			reorderBy: '2026-08-16',
			reorderDue: false
		});

		await p.db
			.updateTable('dies')
			.set({ replacement_lead_days: null })
			.where('id', '=', p.dies.alu)
			.execute();
		await p.db
			.updateTable('replacement_lead_defaults')
			.set({ lead_days: 120 })
			.where('family', '=', 'aluminium')
			.execute();
		// 2026-09-15 − 120 days: back 92 days is 2026-06-15, 28 more is 2026-05-18 — before
		// today (2026-06-10), so the reorder is due.
		expect(await loadReplacementOutlook(p.db, p.dies.alu, NOW)).toMatchObject({
			leadDays: 120,
			leadDaysFrom: 'family',
			reorderBy: '2026-05-18',
			reorderDue: true
		});
	});

	test('a die that has not run has no projection and no reorder date', async () => {
		const o = await loadReplacementOutlook(p.db, p.dies.bolt, NOW);
		expect(o.projectedEndOfLife).toBeNull();
		expect(o).toMatchObject({ leadDays: 84, reorderBy: null, reorderDue: false });
	});
});
