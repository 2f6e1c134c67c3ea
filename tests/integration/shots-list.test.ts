import { beforeEach, describe, expect, test } from 'vitest';
import { shotListQuerySchema } from '../../src/lib/schemas/shots';
import { findDie } from '../../src/lib/server/dies/die-detail';
import { judgeRun } from '../../src/lib/server/schedule/verdict';
import { getDieShotsView, thinSeries } from '../../src/lib/server/shots/die-shots';
import { findDieShotSummary } from '../../src/lib/server/shots/die-summary';
import { recordShots, type ShotInput } from '../../src/lib/server/shots/ledger';
import { listShotEntries } from '../../src/lib/server/shots/ledger-list';
import { hoursFromNow, makeShotPlant, NOW, plant, type ShotPlant } from './shots-fixture';

let p: ShotPlant;
const q = (over: Record<string, string> = {}) => shotListQuerySchema.parse({ size: '10', ...over });

beforeEach(async () => {
	p = await makeShotPlant();
	// 25 readings on Z-0001 (hot press, api), 12 on A-0001 (cold press, csv), one per 3 hours.
	const rows: ShotInput[] = [];
	for (let i = 0; i < 25; i++)
		rows.push({
			die: 'Z-0001',
			shots: 100 + i,
			countedAt: hoursFromNow(-300 + i * 3),
			machine: 'HC-08'
		});
	const z = await recordShots(p.db, rows, plant, { source: 'api', now: NOW });
	const a = await recordShots(
		p.db,
		Array.from({ length: 12 }, (_, i) => ({
			die: 'A-0001',
			shots: 50,
			countedAt: hoursFromNow(-299 + i * 3),
			machine: 'CC-84',
			counterStart: i * 50,
			counterEnd: (i + 1) * 50
		})),
		plant,
		{ source: 'csv', now: NOW }
	);
	expect(z.ok && a.ok).toBe(true);
});

describe('the shot ledger list', () => {
	test('walks the whole ledger newest first in keyset pages, forwards and back, without gaps', async () => {
		const seen: number[] = [];
		let page = await listShotEntries(p.db, q());
		const pages = [page];
		while (page.olderCursor) {
			page = await listShotEntries(p.db, q({ before: page.olderCursor }));
			pages.push(page);
		}
		for (const pg of pages) seen.push(...pg.rows.map((r) => r.id));
		expect(seen).toHaveLength(37);
		expect(new Set(seen).size).toBe(37);
		const times = pages.flatMap((pg) => pg.rows.map((r) => r.countedAt));
		expect(times).toEqual([...times].sort().reverse());
		expect(pages[0].newerCursor).toBeNull();
		expect(pages.map((pg) => pg.rows.length)).toEqual([10, 10, 10, 7]);

		// "Newer" from the third page gives back the second page exactly.
		const back = await listShotEntries(p.db, q({ after: pages[2].newerCursor! }));
		expect(back.rows.map((r) => r.id)).toEqual(pages[1].rows.map((r) => r.id));
		const first = await listShotEntries(p.db, q({ after: pages[1].newerCursor! }));
		expect(first.rows.map((r) => r.id)).toEqual(pages[0].rows.map((r) => r.id));
		expect(first.newerCursor).toBeNull();
	});

	test('filters by die, source, press and dates; unknown names say so', async () => {
		const byDie = await listShotEntries(p.db, q({ q: 'a-0001', size: '50' }));
		expect(byDie.rows).toHaveLength(12);
		expect(new Set(byDie.rows.map((r) => r.die))).toEqual(new Set(['A-0001']));
		expect(byDie.rows[0]).toMatchObject({
			press: 'CC-84',
			source: 'csv',
			counterStart: 550,
			counterEnd: 600,
			enteredBy: 'Lead'
		});

		const prefix = await listShotEntries(p.db, q({ q: 'Z-', size: '50' }));
		expect(prefix.rows).toHaveLength(25);
		expect((await listShotEntries(p.db, q({ source: 'csv', size: '50' }))).rows).toHaveLength(12);
		expect((await listShotEntries(p.db, q({ press: 'hc-08', size: '50' }))).rows).toHaveLength(25);

		const day = hoursFromNow(-300).slice(0, 10);
		const oneDay = await listShotEntries(p.db, q({ from: day, to: day, size: '50' }));
		expect(oneDay.rows.length).toBeGreaterThan(0);
		for (const r of oneDay.rows) expect(r.countedAt.slice(0, 10)).toBe(day);

		expect(await listShotEntries(p.db, q({ q: 'NOPE' }))).toMatchObject({
			rows: [],
			nothingMatches: true
		});
		expect(await listShotEntries(p.db, q({ press: 'CC-999' }))).toMatchObject({
			rows: [],
			nothingMatches: true
		});
		expect(await listShotEntries(p.db, q({ q: 'Z-0001', source: 'csv' }))).toMatchObject({
			rows: [],
			nothingMatches: false
		});
	});

	test('junk in the URL falls back to the defaults instead of failing', () => {
		expect(
			shotListQuerySchema.parse({ source: 'x', from: '2026-13', before: 'bad', size: '9999' })
		).toMatchObject({
			source: '',
			from: '',
			before: '',
			size: 50
		});
	});
});

describe('die views', () => {
	test('the press-run look-up shows total, life used and where the counter left off', async () => {
		expect(await findDieShotSummary(p.db, 'a-0001')).toMatchObject({
			number: 'A-0001',
			totalShots: 600,
			expectedLifeShots: 125_000,
			lifeUsedPct: 0.48,
			lastCounterEnd: 600,
			lastPress: 'CC-84'
		});
		expect(await findDieShotSummary(p.db, 'X-1')).toBeNull();
	});

	test('the shots tab: cumulative series ends on the kept total; months add up to it', async () => {
		const die = (await findDie(p.db, 'Z-0001', { customerId: null }))!;
		const view = await getDieShotsView(p.db, die);
		expect(view.series.at(-1)!.total).toBe(die.total_shots);
		expect(view.months.reduce((s, m) => s + m.shots, 0)).toBe(die.total_shots);
		expect(view.entries).toHaveLength(20);
		expect(view.halves).toHaveLength(2);
	});

	test('thinning keeps the first and the last point', () => {
		const pts = Array.from({ length: 1000 }, (_, i) => i);
		const thin = thinSeries(pts, 100);
		expect(thin[0]).toBe(0);
		expect(thin.at(-1)).toBe(999);
		expect(thin.length).toBeLessThanOrEqual(101);
	});
});

describe('order check for a die', () => {
	test('blocks on the next shot-counted service task before end of life', async () => {
		await p.db
			.insertInto('service_tasks')
			.values([
				{
					die_id: p.dies.alu,
					kind: 'stress_relief',
					interval_shots: 10_000,
					interval_days: null,
					last_done_at: NOW,
					last_done_shots: 0
				},
				{
					die_id: p.dies.alu,
					kind: 'cooling_flush',
					interval_shots: null,
					interval_days: 30,
					last_done_at: NOW,
					last_done_shots: 0
				}
			])
			.execute();
		// 2 cavities, 5 % scrap: 20 000 parts → ⌈20000 / (2 × 0.95)⌉ = 10 527 shots. The stress relief
		// has 10 000 − 600 = 9 400 shots left, so it comes due during the run: a warning.
		const r = await judgeRun(
			p.db,
			{ die: 'A-0001', parts: 20_000, scrapPct: 5, shotsPerHour: 120 },
			{ now: NOW }
		);
		if (!r.ok) throw new Error(r.message);
		expect(r).toMatchObject({ shotsNeeded: 10_527, verdict: 'warning', lifeLeftAtStart: 124_400 });
		expect(r.reasons).toMatchObject([{ code: 'service_due', number: 9_400 }]);
		expect(r.pressHours).toBeCloseTo(10_527 / 120, 9);
	});

	test('a die without shot-counted tasks is limited by its life only; a retired die is blocked', async () => {
		const fits = await judgeRun(
			p.db,
			{ die: 'Z-0001', parts: 1000, scrapPct: 0, shotsPerHour: 300 },
			{ now: NOW }
		);
		expect(fits).toMatchObject({ verdict: 'fits', reasons: [], shotsNeeded: 500 });
		expect(
			await judgeRun(
				p.db,
				{ die: 'R-0001', parts: 10, scrapPct: 0, shotsPerHour: 100 },
				{ now: NOW }
			)
		).toMatchObject({ verdict: 'blocked', reasons: [{ code: 'die_retired' }] });
	});
});
