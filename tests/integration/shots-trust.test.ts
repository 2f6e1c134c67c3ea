// Counts you can trust: shots credited to the halves on the die at the entry's time, one life
// definition (the most-worn active half) on every surface, counter readings as intervals,
// plausibility warnings with a person in the loop, and void/correct of ledger entries.
import { beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { diesNearEndOfLife } from '../../src/lib/server/dies/attention';
import { dieLife, findDie } from '../../src/lib/server/dies/die-detail';
import { replaceHalf } from '../../src/lib/server/dies/halves';
import { listHalfLives, loadDieLife } from '../../src/lib/server/dies/life';
import { listDies } from '../../src/lib/server/dies/register';
import { findNoticeItems } from '../../src/lib/server/notices/find';
import { loadOwnerDies } from '../../src/lib/server/owner/portfolio';
import { dieListQuerySchema } from '../../src/lib/schemas/die';
import { shotListQuerySchema } from '../../src/lib/schemas/shots';
import { listShotEntries } from '../../src/lib/server/shots/ledger-list';
import { ingestShotBody } from '../../src/lib/server/shots/api-ingest';
import { commitShotCsv, parseShotCsv, previewShotCsv } from '../../src/lib/server/shots/csv-upload';
import { findDieShotSummary } from '../../src/lib/server/shots/die-summary';
import {
	confirmShotEntry,
	correctShotEntry,
	recordShots,
	voidShotEntry
} from '../../src/lib/server/shots/ledger';
import { countToReview, listEntriesToReview } from '../../src/lib/server/shots/review';
import {
	hoursFromNow,
	LEAD,
	makeShotPlant,
	NOW,
	plant,
	snapshot,
	type ShotPlant
} from './shots-fixture';

let p: ShotPlant;
beforeEach(async () => {
	p = await makeShotPlant();
});

const manual = { source: 'manual' as const, now: NOW };
const gateway = { userId: null, tokenId: null, customerId: null };

async function halvesOf(db: DB, dieId: number) {
	const rows = await db
		.selectFrom('die_halves')
		.select(['serial', 'shots'])
		.where('die_id', '=', dieId)
		.orderBy('id')
		.execute();
	return Object.fromEntries(rows.map((r) => [r.serial, r.shots]));
}

/** Kept totals against the live (not voided) ledger: die total, roll-up by day. */
async function totalsAgree(db: DB, dieId: number) {
	const [die, live, daily, ledgerDays] = await Promise.all([
		db.selectFrom('dies').select('total_shots').where('id', '=', dieId).executeTakeFirstOrThrow(),
		db
			.selectFrom('shot_entries')
			.select((eb) => eb.fn.coalesce(eb.fn.sum<number>('shots'), eb.lit(0)).as('sum'))
			.where('die_id', '=', dieId)
			.where('voided_at', 'is', null)
			.executeTakeFirstOrThrow(),
		db
			.selectFrom('shot_daily')
			.select(['day', 'shots'])
			.where('die_id', '=', dieId)
			.where('shots', '!=', 0)
			.orderBy('day')
			.execute(),
		db
			.selectFrom('shot_entries')
			.select((eb) => [
				eb.fn<string>('substr', ['counted_at', eb.lit(1), eb.lit(10)]).as('day'),
				eb.fn.sum<number>('shots').as('shots')
			])
			.where('die_id', '=', dieId)
			.where('voided_at', 'is', null)
			.groupBy('day')
			.having((eb) => eb.fn.sum('shots'), '!=', 0)
			.orderBy('day')
			.execute()
	]);
	expect(die.total_shots).toBe(Number(live.sum));
	expect(daily.map((d) => [d.day, d.shots])).toEqual(
		ledgerDays.map((d) => [d.day, Number(d.shots)])
	);
	return die.total_shots;
}

const newEjector = {
	side: 'ejector' as const,
	serial: 'A-0001-E2',
	steel: 'H11',
	hardnessHrc: 47,
	reason: 'Crack across the ejector insert'
};

describe('shots by time, per half', () => {
	beforeEach(async () => {
		const r = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 800, countedAt: hoursFromNow(-48) }],
			plant,
			manual
		);
		expect(r.ok).toBe(true);
		await replaceHalf(p.db, p.dies.alu, newEjector, LEAD, hoursFromNow(-24));
	});

	test('a backdated entry after a half replacement credits the old half, a later one the new', async () => {
		// Typed in after the replacement, but counted 30 h ago — before it (24 h ago).
		const back = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 200, countedAt: hoursFromNow(-30) }],
			plant,
			manual
		);
		expect(back.ok).toBe(true);
		const later = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 300, countedAt: hoursFromNow(-1) }],
			plant,
			manual
		);
		expect(later.ok).toBe(true);
		// By hand: cover 800 + 200 + 300; old ejector 800 + 200; new ejector only the 300.
		expect(await halvesOf(p.db, p.dies.alu)).toEqual({
			'A-0001-C1': 1300,
			'A-0001-E1': 1000,
			'A-0001-E2': 300
		});
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(1300);
	});

	test('an API batch and a CSV row follow the time of each row too', async () => {
		const api = await ingestShotBody(
			p.db,
			[
				{ die: 'A-0001', shots: 50, countedAt: hoursFromNow(-26) },
				{ die: 'A-0001', shots: 70, countedAt: hoursFromNow(-2) }
			],
			gateway,
			NOW
		);
		expect(api.status).toBe(201);
		const csv = await commitShotCsv(
			p.db,
			`die,counted_at,shots\nA-0001,${hoursFromNow(-25)},40\n`,
			1,
			plant,
			NOW
		);
		expect(csv.ok).toBe(true);
		// Before the replacement: 50 + 40 on the old ejector; after it: 70 on the new one.
		expect(await halvesOf(p.db, p.dies.alu)).toEqual({
			'A-0001-C1': 960,
			'A-0001-E1': 890,
			'A-0001-E2': 70
		});
	});

	test('a count at the very moment of the replacement closes the old half’s run', async () => {
		await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 10, countedAt: hoursFromNow(-24) }],
			plant,
			manual
		);
		expect(await halvesOf(p.db, p.dies.alu)).toMatchObject({ 'A-0001-E1': 810, 'A-0001-E2': 0 });
	});

	test('voiding a backdated entry takes its shots off the half that took them', async () => {
		const back = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 200, countedAt: hoursFromNow(-30) }],
			plant,
			manual
		);
		if (!back.ok) throw new Error('refused');
		const v = await voidShotEntry(
			p.db,
			'A-0001',
			back.entryIds[0],
			'Typed twice by mistake',
			plant,
			NOW
		);
		expect(v).toEqual({ ok: true, entryId: back.entryIds[0], dieTotal: 800 });
		expect(await halvesOf(p.db, p.dies.alu)).toEqual({
			'A-0001-C1': 800,
			'A-0001-E1': 800,
			'A-0001-E2': 0
		});
		await totalsAgree(p.db, p.dies.alu);
	});
});

describe('life follows the steel', () => {
	beforeEach(async () => {
		await p.db
			.updateTable('dies')
			.set({ expected_life_shots: 10_000 })
			.where('id', '=', p.dies.alu)
			.execute();
		await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 1000, countedAt: hoursFromNow(-48) }],
			plant,
			manual
		);
		await replaceHalf(p.db, p.dies.alu, newEjector, LEAD, hoursFromNow(-24));
		await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 300, countedAt: hoursFromNow(-1) }],
			plant,
			manual
		);
	});

	test('the most-worn active half sets the die’s life; a half’s own expected life counts', async () => {
		// Die 1300 shots. Cover 1300 of 10 000 = 13 %; new ejector 300 of 10 000 = 3 %.
		let life = await loadDieLife(p.db, p.dies.alu, NOW);
		expect(life).toMatchObject({
			lifeSide: 'cover',
			lifeShots: 1300,
			lifeExpectedShots: 10_000,
			shotsRemaining: 8700
		});
		expect(life.lifeUsedPct).toBeCloseTo(13, 10);
		// The new ejector is a softer steel with 2 000 shots expected: 300 / 2 000 = 15 % > 13 %.
		await p.db
			.updateTable('die_halves')
			.set({ expected_life_shots: 2000 })
			.where('serial', '=', 'A-0001-E2')
			.execute();
		life = await loadDieLife(p.db, p.dies.alu, NOW);
		expect(life).toMatchObject({ lifeSide: 'ejector', lifeShots: 300, shotsRemaining: 1700 });
		expect(life.lifeUsedPct).toBeCloseTo(15, 10);
		// Shots per day over the trailing 28 days: 1300 / 28; 1700 left at that rate is 36.6 days,
		// rounded up to 37 days after 2026-06-10 → 2026-07-17.
		expect(life.shotsPerDay).toBeCloseTo(1300 / 28, 10);
		expect(life.projectedEndOfLife).toBe('2026-07-17');
	});

	test('a die with both halves replaced starts fresh', async () => {
		await replaceHalf(
			p.db,
			p.dies.alu,
			{ ...newEjector, side: 'cover', serial: 'A-0001-C2' },
			LEAD,
			hoursFromNow(-0.5)
		);
		const life = await loadDieLife(p.db, p.dies.alu, NOW);
		// Cover C2: 0 shots; ejector E2: 300 of 10 000 = 3 % (the die total stays 1300).
		expect(life.lifeUsedPct).toBeCloseTo(3, 10);
		expect(life.lifeShots).toBe(300);
	});

	test('every surface shows the same life used', async () => {
		// Hand value: cover half 1300 of 10 000 shots = 13 %.
		const expected = 13;
		const die = (await findDie(p.db, 'A-0001', { customerId: null }))!;
		const [register, page, owner, summary, halves] = await Promise.all([
			listDies(p.db, dieListQuerySchema.parse({ q: 'A-0001' }), { customerId: null }, NOW),
			dieLife(p.db, die, NOW),
			loadOwnerDies(p.db, p.owners.acme, NOW),
			findDieShotSummary(p.db, 'A-0001'),
			listHalfLives(p.db, p.dies.alu)
		]);
		expect(register.rows[0].lifeUsedPct).toBeCloseTo(expected, 10);
		expect(page.lifeUsedPct).toBeCloseTo(expected, 10);
		expect(owner.find((d) => d.number === 'A-0001')!.lifeUsedPct).toBeCloseTo(expected, 10);
		expect(summary!.lifeUsedPct).toBeCloseTo(expected, 10);
		expect(halves.find((h) => h.setsDieLife)).toMatchObject({ serial: 'A-0001-C1', shots: 1300 });
		expect(owner.find((d) => d.number === 'A-0001')!.projectedEndOfLife).toBe(
			page.projectedEndOfLife
		);

		// Near end of life (≥ 90 %) and the life notice: push the cover half to 9 100 of 10 000.
		await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 7800, countedAt: hoursFromNow(-0.01) }],
			plant,
			{ ...manual, source: 'correction' as const }
		).then((r) => expect(r.ok).toBe(false)); // a correction needs a note; shows nothing moved
		await recordShots(
			p.db,
			[
				{
					die: 'A-0001',
					shots: 7800,
					countedAt: hoursFromNow(-0.01),
					note: 'Count carried over from the press log'
				}
			],
			plant,
			{ ...manual, source: 'correction' as const }
		);
		const [near, notices] = await Promise.all([
			diesNearEndOfLife(p.db, 90),
			findNoticeItems(p.db, NOW)
		]);
		// Cover 1300 + 7800 = 9100 of 10 000 = 91 %; the new ejector 8100 of 10 000 = 81 %.
		expect(near.map((d) => [d.number, d.lifeUsedPct])).toEqual([['A-0001', 91]]);
		const notice = notices.find((n) => n.kind === 'life' && n.dieId === p.dies.alu);
		expect(notice?.subject).toBe('A-0001 · 91 % of expected life used');
	});
});

describe('counter readings are intervals', () => {
	const run = (countedAt: string, start = 50_200, end = 50_512) => ({
		die: 'A-0001',
		shots: end - start,
		counterStart: start,
		counterEnd: end,
		machine: 'CC-84',
		countedAt
	});

	beforeEach(async () => {
		const r = await recordShots(p.db, [run(hoursFromNow(-3))], plant, manual);
		expect(r.ok).toBe(true);
	});

	test('the same readings entered again on the form are refused, naming the earlier entry', async () => {
		const before = await snapshot(p.db);
		const again = await recordShots(p.db, [run(hoursFromNow(-1))], plant, manual);
		expect(again).toEqual({
			ok: false,
			issues: [
				{
					index: 0,
					field: 'counterStart',
					message:
						'Counter 50,200 → 50,512 overlaps the entry of 2026-06-10 09:00 UTC by Lead on CC-84 (counter 50,200 → 50,512, 312 shots) on die A-0001; these shots are already counted. If the counter was reset, give the reason.'
				}
			]
		});
		expect(await snapshot(p.db)).toEqual(before);
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(312);
	});

	test('a run that starts where the last one ended is fine; a partial overlap is not', async () => {
		expect(
			(await recordShots(p.db, [run(hoursFromNow(-2), 50_512, 50_700)], plant, manual)).ok
		).toBe(true);
		const partial = await recordShots(p.db, [run(hoursFromNow(-1), 50_650, 50_800)], plant, manual);
		expect(partial.ok).toBe(false);
		if (!partial.ok)
			expect(partial.issues[0].message).toMatch(/counter 50,512 → 50,700, 188 shots/);
	});

	test('the press counter is an interval too: another die on the same press may not reuse it', async () => {
		const other = await recordShots(
			p.db,
			[{ ...run(hoursFromNow(-1), 50_300, 50_400), die: 'B-0001' }],
			plant,
			manual
		);
		expect(other.ok).toBe(false);
		if (!other.ok) {
			expect(other.issues[0].message).toMatch(
				/overlaps the entry of 2026-06-10 09:00 UTC .* on press CC-84/
			);
		}
	});

	test('a smaller start needs a stated reset reason; with one it counts and is audited', async () => {
		const back = await recordShots(p.db, [run(hoursFromNow(-1), 100, 400)], plant, manual);
		expect(back.ok).toBe(false);
		if (!back.ok) {
			expect(back.issues[0].message).toMatch(
				/^The counter start 100 is below the last reading 50,512 \(the entry of 2026-06-10 09:00 UTC by Lead/
			);
		}
		const short = await recordShots(
			p.db,
			[{ ...run(hoursFromNow(-1), 100, 400), resetReason: 'new' }],
			plant,
			manual
		);
		expect(short.ok).toBe(false);
		const reset = await recordShots(
			p.db,
			[{ ...run(hoursFromNow(-1), 100, 400), resetReason: 'Press controller swapped on CC-84' }],
			plant,
			manual
		);
		expect(reset.ok).toBe(true);
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(612);
		const audit = await p.db
			.selectFrom('audit_log')
			.select('detail')
			.where('action', '=', 'shots.counter_reset')
			.executeTakeFirstOrThrow();
		expect(JSON.parse(audit.detail)).toEqual({
			counterStart: 100,
			counterEnd: 400,
			reason: 'Press controller swapped on CC-84'
		});
		// After the reset the new counter runs on: 400 → 500 is fine, 300 → 450 overlaps the reset run.
		expect((await recordShots(p.db, [run(hoursFromNow(-0.5), 400, 500)], plant, manual)).ok).toBe(
			true
		);
		expect((await recordShots(p.db, [run(hoursFromNow(-0.2), 300, 450)], plant, manual)).ok).toBe(
			false
		);
	});

	test('the CSV preview marks an overlapping row, naming the earlier entry', async () => {
		const parsed = parseShotCsv(
			'die,counted_at,counter_start,counter_end,press\n' +
				`A-0001,${hoursFromNow(-1)},50200,50512,CC-84\n` +
				`A-0001,${hoursFromNow(-0.5)},50512,50600,CC-84\n`
		);
		if (!parsed.ok) throw new Error(parsed.message);
		const { preview } = await previewShotCsv(p.db, parsed, plant, NOW);
		expect(preview.rows.map((r) => [r.line, r.status, r.column])).toEqual([
			[2, 'wrong', 'counter_start'],
			[3, 'valid', null]
		]);
		expect(preview.rows[0].reason).toMatch(
			/overlaps the entry of 2026-06-10 09:00 UTC by Lead on CC-84 \(counter 50,200 → 50,512, 312 shots\)/
		);
	});

	test('the API answers 409 for one overlapping entry and a row issue in a batch', async () => {
		const body = {
			die: 'A-0001',
			counterStart: 50_200,
			counterEnd: 50_512,
			press: 'CC-84',
			countedAt: hoursFromNow(-1)
		};
		const single = await ingestShotBody(p.db, body, gateway, NOW);
		expect(single.status).toBe(409);
		expect(single.body).toMatchObject({
			error: expect.stringMatching(/overlaps the entry of 2026-06-10 09:00 UTC by Lead/)
		});
		const batch = await ingestShotBody(
			p.db,
			[{ ...body, counterStart: 50_512, counterEnd: 50_600 }, body],
			gateway,
			NOW
		);
		expect(batch.status).toBe(400);
		expect(batch.body).toMatchObject({
			issues: [{ index: 1, field: 'counterStart', message: expect.stringMatching(/overlaps/) }]
		});
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(312);
	});

	test('the API takes counters with press, or machine as its old name', async () => {
		const viaPress = await ingestShotBody(
			p.db,
			{
				die: 'A-0001',
				counterStart: 50_512,
				counterEnd: 50_600,
				press: 'CC-84',
				countedAt: hoursFromNow(-1)
			},
			gateway,
			NOW
		);
		expect(viaPress).toEqual({
			status: 201,
			body: { accepted: 1, duplicates: 0, dies: [{ die: 'A-0001', totalShots: 400 }], warnings: [] }
		});
		const viaMachine = await ingestShotBody(
			p.db,
			{ die: 'A-0001', shots: 100, counterStart: 50_600, counterEnd: 50_700, machine: 'CC-84' },
			gateway,
			NOW
		);
		expect(viaMachine.status).toBe(201);
		const entry = await p.db
			.selectFrom('shot_entries')
			.innerJoin('machines', 'machines.id', 'shot_entries.machine_id')
			.select(['machines.name', 'shot_entries.counter_end'])
			.orderBy('shot_entries.id', 'desc')
			.executeTakeFirstOrThrow();
		expect(entry).toEqual({ name: 'CC-84', counter_end: 50_700 });
		const mismatch = await ingestShotBody(
			p.db,
			{ die: 'A-0001', counterStart: 50_700, counterEnd: 50_800 },
			gateway,
			NOW
		);
		expect(mismatch.status).toBe(201);
		const both = await ingestShotBody(
			p.db,
			{ die: 'A-0001', shots: 5, press: 'CC-84', machine: 'HC-08' },
			gateway,
			NOW
		);
		expect(both.status).toBe(400);
	});
});

describe('plausibility with a person in the loop', () => {
	beforeEach(async () => {
		await p.db
			.updateTable('dies')
			.set({ status: 'in_toolroom' })
			.where('id', '=', p.dies.alu)
			.execute();
	});

	test('an API entry for a die in the toolroom is accepted with a warning and is to review', async () => {
		const answer = await ingestShotBody(
			p.db,
			{ die: 'A-0001', shots: 120, press: 'CC-84', countedAt: hoursFromNow(-1) },
			gateway,
			NOW
		);
		expect(answer).toEqual({
			status: 201,
			body: {
				accepted: 1,
				duplicates: 0,
				dies: [{ die: 'A-0001', totalShots: 120 }],
				warnings: [
					{ index: 0, message: 'Die A-0001 is in the toolroom; it should not be running.' }
				]
			}
		});
		expect((await countToReview(p.db, [p.dies.alu])).get(p.dies.alu)).toBe(1);
		const list = await listEntriesToReview(p.db);
		expect(list).toMatchObject([{ dieNumber: 'A-0001', shots: 120, press: 'CC-84' }]);

		// The lead confirms it: it keeps counting and leaves the list; the reason is audited.
		const refused = await confirmShotEntry(p.db, 'A-0001', list[0].id, 'ok', plant, NOW);
		expect(refused.ok).toBe(false);
		const confirmed = await confirmShotEntry(
			p.db,
			'A-0001',
			list[0].id,
			'Trial shots after the repair, agreed with the shift lead',
			plant,
			NOW
		);
		expect(confirmed).toEqual({ ok: true, entryId: list[0].id, dieTotal: 120 });
		expect((await countToReview(p.db, [p.dies.alu])).get(p.dies.alu)).toBeUndefined();
		expect(await listEntriesToReview(p.db)).toEqual([]);
		const again = await confirmShotEntry(
			p.db,
			'A-0001',
			list[0].id,
			'once more please',
			plant,
			NOW
		);
		expect(again).toMatchObject({ ok: false, message: 'This entry is not waiting for review.' });
	});

	test('on the form the same entry needs a confirm reason, then counts as confirmed', async () => {
		const entry = { die: 'A-0001', shots: 120, machine: 'CC-84', countedAt: hoursFromNow(-1) };
		const before = await snapshot(p.db);
		const asked = await recordShots(p.db, [entry], plant, manual);
		expect(asked).toEqual({
			ok: false,
			issues: [
				{
					index: 0,
					field: 'confirm',
					message:
						'Die A-0001 is in the toolroom; it should not be running. To count it anyway, confirm with a reason.'
				}
			]
		});
		expect(await snapshot(p.db)).toEqual(before);
		const counted = await recordShots(
			p.db,
			[{ ...entry, confirmReason: 'Trial shots after the repair' }],
			plant,
			manual
		);
		expect(counted).toMatchObject({ ok: true, accepted: 1 });
		const row = await p.db
			.selectFrom('shot_entries')
			.select(['review_state', 'review_reason', 'reviewed_by', 'warning'])
			.executeTakeFirstOrThrow();
		expect(row).toEqual({
			review_state: 'confirmed',
			review_reason: 'Trial shots after the repair',
			reviewed_by: LEAD,
			warning: 'Die A-0001 is in the toolroom; it should not be running.'
		});
		expect((await countToReview(p.db, [p.dies.alu])).size).toBe(0);
	});

	test('a hot-chamber die on a cold-chamber press, and a held die, are flagged', async () => {
		await p.db.updateTable('dies').set({ status: 'held' }).where('id', '=', p.dies.zinc).execute();
		const answer = await ingestShotBody(
			p.db,
			[{ die: 'Z-0001', shots: 100, press: 'CC-84', countedAt: hoursFromNow(-1) }],
			gateway,
			NOW
		);
		expect(answer.body).toMatchObject({
			warnings: [
				{ index: 0, message: 'Die Z-0001 is held (quarantined); it should not be running.' },
				{
					index: 0,
					message: 'Press CC-84 is a cold-chamber press; die Z-0001 is made for hot chamber.'
				}
			]
		});
	});

	test('a rate above the plausible shots per hour is flagged through the API, not refused', async () => {
		await p.db.updateTable('dies').set({ status: 'ready' }).where('id', '=', p.dies.alu).execute();
		// A380 on a cold-chamber press: at most 400 shots/h (twice the NADCA FAQ top of range);
		// 5 000 shots one hour after the previous reading is far above it.
		const answer = await ingestShotBody(
			p.db,
			[
				{ die: 'A-0001', shots: 100, countedAt: hoursFromNow(-2) },
				{ die: 'A-0001', shots: 5000, countedAt: hoursFromNow(-1) }
			],
			gateway,
			NOW
		);
		expect(answer.status).toBe(201);
		expect(answer.body).toMatchObject({
			accepted: 2,
			warnings: [{ index: 1, message: expect.stringMatching(/at most 400 at 400 shots\/h/) }]
		});
		expect((await countToReview(p.db, [p.dies.alu])).get(p.dies.alu)).toBe(1);
	});

	test('the CSV preview asks a reason for flagged rows; without one they are left out', async () => {
		const text = `die,counted_at,shots\nA-0001,${hoursFromNow(-2)},100\nZ-0001,${hoursFromNow(-2)},80\n`;
		const parsed = parseShotCsv(text);
		if (!parsed.ok) throw new Error(parsed.message);
		const { preview } = await previewShotCsv(p.db, parsed, plant, NOW);
		expect(preview.rows.map((r) => [r.die, r.status])).toEqual([
			['A-0001', 'confirm'],
			['Z-0001', 'valid']
		]);
		expect(preview.rows[0].reason).toMatch(/in the toolroom/);
		expect(preview).toMatchObject({ valid: 1, confirm: 1, wrong: 0 });

		const without = await commitShotCsv(p.db, text, 1, plant, NOW);
		expect(without).toMatchObject({ ok: true, counted: 1, shots: 80 });
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(0);

		const withReason = await commitShotCsv(
			p.db,
			text,
			0,
			plant,
			NOW,
			'Trial run agreed with the lead'
		);
		expect(withReason).toMatchObject({ ok: true, counted: 1, duplicates: 1, shots: 100 });
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(100);
	});
});

describe('the toolroom lead corrects or voids a ledger entry', () => {
	let entryId: number;
	beforeEach(async () => {
		const r = await recordShots(
			p.db,
			[
				{ die: 'A-0001', shots: 500, countedAt: hoursFromNow(-30) },
				{
					die: 'A-0001',
					shots: 312,
					counterStart: 50_200,
					counterEnd: 50_512,
					machine: 'CC-84',
					countedAt: hoursFromNow(-3)
				}
			],
			plant,
			manual
		);
		if (!r.ok) throw new Error(JSON.stringify(r.issues));
		entryId = r.entryIds[0];
	});

	test('a void keeps the entry, takes it out of every total and is audited', async () => {
		const v = await voidShotEntry(p.db, 'A-0001', entryId, 'Counted on the wrong die', plant, NOW);
		expect(v).toEqual({ ok: true, entryId, dieTotal: 312 });
		const row = await p.db
			.selectFrom('shot_entries')
			.select(['shots', 'voided_at', 'void_reason', 'voided_by'])
			.where('id', '=', entryId)
			.executeTakeFirstOrThrow();
		expect(row).toEqual({
			shots: 500,
			voided_at: NOW,
			void_reason: 'Counted on the wrong die',
			voided_by: LEAD
		});
		expect(await halvesOf(p.db, p.dies.alu)).toEqual({ 'A-0001-C1': 312, 'A-0001-E1': 312 });
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(312);
		const audit = await p.db
			.selectFrom('audit_log')
			.select('detail')
			.where('action', '=', 'shots.void')
			.executeTakeFirstOrThrow();
		expect(JSON.parse(audit.detail)).toMatchObject({
			entry: entryId,
			shots: 500,
			reason: 'Counted on the wrong die'
		});
		expect(
			await voidShotEntry(p.db, 'A-0001', entryId, 'Counted on the wrong die', plant, NOW)
		).toMatchObject({
			ok: false,
			message: 'This entry is already voided.'
		});
		// The ledger list keeps it, marked voided with its reason (the page strikes it through).
		const listed = await listShotEntries(p.db, shotListQuerySchema.parse({ q: 'A-0001' }));
		expect(listed.rows.find((r) => r.id === entryId)).toMatchObject({
			shots: 500,
			voidedAt: NOW,
			voidReason: 'Counted on the wrong die'
		});
		// Another die's number does not reach the entry.
		expect((await voidShotEntry(p.db, 'Z-0001', entryId, 'wrong die here', plant, NOW)).ok).toBe(
			false
		);
	});

	test('a voided counter run frees its readings for the right entry', async () => {
		const run = await p.db
			.selectFrom('shot_entries')
			.select('id')
			.where('counter_end', '=', 50_512)
			.executeTakeFirstOrThrow();
		await voidShotEntry(p.db, 'A-0001', run.id, 'Run belonged to die B-0001', plant, NOW);
		const moved = await recordShots(
			p.db,
			[
				{
					die: 'B-0001',
					shots: 312,
					counterStart: 50_200,
					counterEnd: 50_512,
					machine: 'CC-84',
					countedAt: hoursFromNow(-3)
				}
			],
			plant,
			manual
		);
		expect(moved.ok).toBe(true);
	});

	test('a correction voids the entry and counts the corrected figures in one go', async () => {
		const c = await correctShotEntry(
			p.db,
			'A-0001',
			entryId,
			{ shots: 450 },
			'Counter photo shows 450, not 500',
			plant,
			NOW
		);
		expect(c).toEqual({ ok: true, entryId: expect.any(Number), dieTotal: 762 });
		if (!c.ok) return;
		const rows = await p.db
			.selectFrom('shot_entries')
			.select(['id', 'shots', 'counted_at', 'voided_at', 'replaces_id'])
			.where('id', 'in', [entryId, c.entryId])
			.orderBy('id')
			.execute();
		expect(rows).toEqual([
			{ id: entryId, shots: 500, counted_at: hoursFromNow(-30), voided_at: NOW, replaces_id: null },
			{
				id: c.entryId,
				shots: 450,
				counted_at: hoursFromNow(-30),
				voided_at: null,
				replaces_id: entryId
			}
		]);
		// 450 + 312 on the die and on both halves; the roll-up follows.
		expect(await halvesOf(p.db, p.dies.alu)).toEqual({ 'A-0001-C1': 762, 'A-0001-E1': 762 });
		expect(await totalsAgree(p.db, p.dies.alu)).toBe(762);
	});

	test('a correction is checked like any entry: overlapping counters refuse it and nothing changes', async () => {
		const before = await snapshot(p.db);
		const c = await correctShotEntry(
			p.db,
			'A-0001',
			entryId,
			{ counterStart: 50_000, counterEnd: 50_300, machine: 'CC-84' },
			'Entered as counter readings',
			plant,
			NOW
		);
		expect(c).toMatchObject({
			ok: false,
			field: 'counterStart',
			message: expect.stringMatching(/overlaps/)
		});
		expect(await snapshot(p.db)).toEqual(before);
		expect(
			await correctShotEntry(p.db, 'A-0001', entryId, { shots: 450 }, 'no', plant, NOW)
		).toMatchObject({ ok: false, field: 'reason' });
	});

	test('a correction moves the entry to the half that was on the die at its new time', async () => {
		await replaceHalf(p.db, p.dies.alu, newEjector, LEAD, hoursFromNow(-10));
		expect(await halvesOf(p.db, p.dies.alu)).toEqual({
			'A-0001-C1': 812,
			'A-0001-E1': 500,
			'A-0001-E2': 312
		});
		// The 500 (30 h ago) sits on the old ejector; moved to 2 h ago it belongs to the new one.
		const c = await correctShotEntry(
			p.db,
			'A-0001',
			entryId,
			{ countedAt: hoursFromNow(-2) },
			'Counted at the end of this morning’s run',
			plant,
			NOW
		);
		expect(c.ok).toBe(true);
		// The replacement (10 h ago) took the 312 run (3 h ago) over to the new ejector: E1 500,
		// E2 312. The corrected 500, now 2 h ago, follows: E1 0, E2 812. The cover keeps 812.
		expect(await halvesOf(p.db, p.dies.alu)).toEqual({
			'A-0001-C1': 812,
			'A-0001-E1': 0,
			'A-0001-E2': 812
		});
	});
});
