import { beforeEach, describe, expect, test } from 'vitest';
import { listHalves, replaceHalf } from '../../src/lib/server/dies/halves';
import { recordShots } from '../../src/lib/server/shots/ledger';
import {
	hoursFromNow,
	LEAD,
	ledgerState,
	makeShotPlant,
	NOW,
	plant,
	snapshot,
	type ShotPlant
} from './shots-fixture';

let p: ShotPlant;
beforeEach(async () => {
	p = await makeShotPlant();
	const r = await recordShots(
		p.db,
		[{ die: 'A-0001', shots: 800, countedAt: hoursFromNow(-48) }],
		plant,
		{ source: 'manual', now: NOW }
	);
	expect(r.ok).toBe(true);
});

const newEjector = {
	side: 'ejector' as const,
	serial: 'a-0001-e2',
	steel: 'H11',
	hardnessHrc: 47,
	reason: 'Crack across the ejector insert, beyond weld repair'
};

describe('replacing a half', () => {
	test('retires the old half with its final count; the new one starts at 0; the die total runs on', async () => {
		const result = await replaceHalf(p.db, p.dies.alu, newEjector, LEAD, hoursFromNow(-24));
		expect(result).toEqual({
			ok: true,
			removed: { serial: 'A-0001-E1', shots: 800 },
			installed: { id: expect.any(Number), serial: 'A-0001-E2' },
			dieTotal: 800
		});
		await recordShots(p.db, [{ die: 'A-0001', shots: 300, countedAt: hoursFromNow(-1) }], plant, {
			source: 'manual',
			now: NOW
		});

		const halves = await listHalves(p.db, p.dies.alu);
		const view = halves.map((h) => [
			h.side,
			h.serial,
			h.active,
			h.shots,
			h.die_shots_at_install,
			h.removal_reason
		]);
		expect(view).toEqual([
			['cover', 'A-0001-C1', 1, 1100, 0, null],
			['ejector', 'A-0001-E2', 1, 300, 800, null],
			['ejector', 'A-0001-E1', 0, 800, 0, newEjector.reason]
		]);
		const state = await ledgerState(p.db, p.dies.alu);
		expect(state).toMatchObject({ total: 1100, ledgerSum: 1100 });
		// Every active half carries exactly the shots since it went in.
		for (const h of halves.filter((x) => x.active))
			expect(h.shots).toBe(state.total - h.die_shots_at_install);

		const audit = await p.db
			.selectFrom('audit_log')
			.selectAll()
			.where('action', '=', 'half.replace')
			.execute();
		expect(audit).toHaveLength(1);
		expect(JSON.parse(audit[0].detail)).toEqual({
			side: 'ejector',
			removed: { serial: 'A-0001-E1', shots: 800 },
			installed: { serial: 'A-0001-E2', steel: 'H11', hardnessHrc: 47 },
			dieShots: 800,
			reason: newEjector.reason
		});
		expect(audit[0].user_id).toBe(LEAD);
	});

	test('a serial already on record is refused and nothing changes', async () => {
		const before = await snapshot(p.db);
		const r = await replaceHalf(p.db, p.dies.alu, { ...newEjector, serial: 'z-0001-c1' }, LEAD);
		expect(r).toEqual({
			ok: false,
			field: 'serial',
			message: 'Serial Z-0001-C1 is already on record (die Z-0001). Each half needs its own serial.'
		});
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('a retired die keeps its halves', async () => {
		const before = await snapshot(p.db);
		const r = await replaceHalf(p.db, p.dies.retired, newEjector, LEAD);
		expect(r).toMatchObject({ ok: false, field: 'die', message: expect.stringMatching(/retired/) });
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('a correction cannot take the new half below zero', async () => {
		// Replaced an hour before the correction's time, so the correction lands on the new half
		// (0 shots): −100 would take it to −100.
		await replaceHalf(p.db, p.dies.alu, newEjector, LEAD, hoursFromNow(-1));
		const before = await snapshot(p.db);
		const r = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: -100, note: 'over-counted' }],
			plant,
			{ source: 'correction', now: NOW }
		);
		expect(r).toEqual({
			ok: false,
			issues: [
				{
					index: 0,
					field: 'shots',
					message:
						'The correction would take a half of die A-0001 below zero shots (the half on the die at that time has 0).'
				}
			]
		});
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('a replacement and shot posts racing each other lose no shot', async () => {
		const posts = Array.from({ length: 20 }, (_, i) =>
			recordShots(
				p.db,
				[{ die: 'A-0001', shots: 10, countedAt: hoursFromNow(-20 + i * 0.5) }],
				plant,
				{ source: 'api', now: NOW }
			)
		);
		const [replaced] = await Promise.all([
			replaceHalf(p.db, p.dies.alu, newEjector, LEAD),
			...posts
		]);
		expect(replaced.ok).toBe(true);
		const state = await ledgerState(p.db, p.dies.alu);
		expect(state.total).toBe(1000);
		const halves = await listHalves(p.db, p.dies.alu);
		const old = halves.find((h) => h.serial === 'A-0001-E1')!;
		const fresh = halves.find((h) => h.serial === 'A-0001-E2')!;
		expect(old.shots + fresh.shots).toBe(1000);
		// The 800 from before and every post (20 × 10) are dated before the replacement (dated now),
		// so all 1000 stay on the old ejector whichever commits first — on PostgreSQL's pool the
		// replacement may land between posts, so the die count at install is not always 1000.
		expect(old.shots).toBe(1000);
		expect(fresh.shots).toBe(0);
	});
});
