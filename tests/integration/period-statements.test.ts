import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import { extractText, getDocumentProxy } from 'unpdf';
import { parse } from 'csv-parse/sync';
import { resolvePeriod } from '../../src/lib/calc/statement-period';
import { setPlantZone } from '../../src/lib/plant-time';
import { dieFormSchema } from '../../src/lib/schemas/die';
import { statementPeriodSchema } from '../../src/lib/schemas/statement';
import { formatCsv } from '../../src/lib/server/csv';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { createDie } from '../../src/lib/server/dies/die-write';
import { markTaskDone } from '../../src/lib/server/dies/service-plan';
import { findOwnerDie, getOwnerDieStory } from '../../src/lib/server/owner/die-page';
import {
	buildPeriodStatement,
	findIssuedStatement,
	issueStatement,
	listIssuedStatements,
	type PeriodStatement
} from '../../src/lib/server/owner/period-statement';
import { statementCsvHeader, statementCsvRows } from '../../src/lib/server/owner/statement-csv';
import { renderPeriodStatementPdf } from '../../src/lib/server/owner/statement-pdf';
import { lastServiceText } from '../../src/lib/server/owner/service-history';
import { recordOpeningBalance } from '../../src/lib/server/shots/opening-balance';
import { recordShots, voidShotEntry } from '../../src/lib/server/shots/ledger';
import { savePlantIdentity } from '../../src/lib/server/settings/plant-identity';

// A hand-built ledger in a plant on Berlin time (UTC+1 in winter, UTC+2 from 29 March 2026, the
// last Sunday of March — EU summer-time rule, common practice), so period edges are plant
// midnights, not UTC ones. Every expected sum below is written out by hand from this list.
//
// D-0101 (ACME), counted at (UTC) → plant date in Berlin:
//   2026-01-15T10:00Z  1 000  → 15 Jan
//   2026-02-28T23:30Z    200  → 1 Mar 00:30 (March at the plant, February in UTC)
//   2026-03-10T08:00Z    300  → 10 Mar
//   2026-03-31T21:30Z    400  → 31 Mar 23:30
//   2026-03-31T22:30Z    500  → 1 Apr 00:30
//   2026-04-20T09:00Z    600  → 20 Apr
//   2026-04-21T09:00Z 10 000  → voided: counts nothing
//   2026-05-05T09:00Z    700  → 5 May
//   2026-06-30T21:59Z    800  → 30 Jun 23:59
//   2026-06-30T22:01Z    900  → 1 Jul 00:01
// D-0102 (ACME): opening balance 50 000 from an older register (entered 10 Apr 2026), then
//   2026-04-15T12:00Z 250, 2026-05-20T12:00Z 350.
// D-0201 (BOLT): 2026-04-15T12:00Z 99 999 — another owner's, never on ACME's statement.

const NOW = '2026-07-02T12:00:00.000Z';
const ADMIN = 'admin-1';
const ZONE = 'Europe/Berlin';
let db: DB;
let acme: number;
const ids = new Map<string, number>();

async function die(number: string, customerId: number) {
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', 'A380')
		.executeTakeFirstOrThrow();
	const form = dieFormSchema.parse({
		number,
		partName: `Part of ${number}`,
		customerId,
		alloyId: alloy.id,
		process: 'cold_chamber',
		cavities: 1,
		projectedAreaCm2: 300
	});
	expect(await createDie(db, form, ADMIN, '2025-12-01T08:00:00.000Z')).toEqual({
		ok: true,
		number
	});
	const row = await db
		.selectFrom('dies')
		.select('id')
		.where('number', '=', number)
		.executeTakeFirstOrThrow();
	ids.set(number, row.id);
}

async function count(number: string, entries: [countedAt: string, shots: number][]) {
	const result = await recordShots(
		db,
		// Counts close to a plant midnight are confirmed: the edges are the point of these tests.
		entries.map(([countedAt, shots]) => ({
			die: number,
			shots,
			countedAt,
			confirmReason: 'Test ledger, checked by hand'
		})),
		{ userId: ADMIN, tokenId: null, customerId: null },
		{ source: 'manual', now: NOW }
	);
	expect(result, JSON.stringify(result)).toMatchObject({ ok: true });
}

beforeEach(async () => {
	db = await openTestDatabase();
	ids.clear();
	await db.updateTable('plant_settings').set({ time_zone: ZONE }).execute();
	setPlantZone(ZONE);
	await db
		.insertInto('customers')
		.values([
			{ code: 'ACME', name: 'Acme Pumps' },
			{ code: 'BOLT', name: 'Bolt Tools' }
		])
		.execute();
	const customers = await db.selectFrom('customers').select(['id', 'code']).execute();
	acme = customers.find((c) => c.code === 'ACME')!.id;
	const bolt = customers.find((c) => c.code === 'BOLT')!.id;
	await db
		.insertInto('users')
		.values({
			id: ADMIN,
			email: 'a@p.test',
			name: 'A',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	await die('D-0101', acme);
	await die('D-0102', acme);
	await die('D-0201', bolt);
	await recordOpeningBalance(db, {
		dieId: ids.get('D-0102')!,
		shots: 50_000,
		at: '2026-04-10T08:00:00.000Z',
		userId: ADMIN,
		note: 'From the old register'
	});
	await count('D-0101', [
		['2026-01-15T10:00:00.000Z', 1000],
		['2026-02-28T23:30:00.000Z', 200],
		['2026-03-10T08:00:00.000Z', 300],
		['2026-03-31T21:30:00.000Z', 400],
		['2026-03-31T22:30:00.000Z', 500],
		['2026-04-20T09:00:00.000Z', 600],
		['2026-04-21T09:00:00.000Z', 10_000],
		['2026-05-05T09:00:00.000Z', 700],
		['2026-06-30T21:59:00.000Z', 800],
		['2026-06-30T22:01:00.000Z', 900]
	]);
	const wrong = await db
		.selectFrom('shot_entries')
		.select('id')
		.where('shots', '=', 10_000)
		.executeTakeFirstOrThrow();
	const voided = await voidShotEntry(
		db,
		'D-0101',
		wrong.id,
		'Typed one zero too many',
		{ userId: ADMIN, tokenId: null, customerId: null },
		NOW
	);
	expect(voided.ok).toBe(true);
	await count('D-0102', [
		['2026-04-15T12:00:00.000Z', 250],
		['2026-05-20T12:00:00.000Z', 350]
	]);
	await count('D-0201', [['2026-04-15T12:00:00.000Z', 99_999]]);
	await savePlantIdentity(
		db,
		{
			name: 'Kestrel Casting Works',
			address: '4 Foundry Lane\nNorthbridge',
			contactEmail: 'tooling@kestrel.test',
			contactPhone: '+44 1632 960000',
			statementFooter: 'Kestrel Casting Works · tooling desk',
			repairRatePerHour: 62.4,
			currency: 'EUR'
		},
		ADMIN,
		NOW
	);
});

afterEach(() => setPlantZone('UTC'));

const issueFor = (label: string) => ({ reference: `ST-ACME-TEST-${label}`, issuedAt: NOW });

async function statementFor(spec: Parameters<typeof resolvePeriod>[0]): Promise<PeriodStatement> {
	const period = resolvePeriod(spec);
	return (await buildPeriodStatement(db, acme, period, issueFor(period.kind)))!;
}

function figures(s: PeriodStatement) {
	return Object.fromEntries(
		s.dies.map((d) => [d.number, [d.openingShots, d.periodShots, d.closingShots]])
	);
}

describe('period statement totals against the ledger', () => {
	test('a month: March 2026 at the plant', async () => {
		const s = await statementFor({ kind: 'month', year: 2026, month: 3 });
		expect(s.period).toMatchObject({ from: '2026-03-01', to: '2026-03-31' });
		// D-0101: opening = 1 000 (15 Jan); March = 200 + 300 + 400 = 900; closing 1 900.
		// D-0102: opening = the 50 000 brought over; nothing in March.
		expect(figures(s)).toEqual({ 'D-0101': [1000, 900, 1900], 'D-0102': [50_000, 0, 50_000] });
		// In sum: 51 000 + 900 = 51 900.
		expect(s.totals).toMatchObject({
			openingShots: 51_000,
			periodShots: 900,
			closingShots: 51_900
		});
	});

	test('a quarter: Q2 2026, with its months after an opening-balance row', async () => {
		const s = await statementFor({ kind: 'quarter', year: 2026, quarter: 2 });
		// D-0101: opening = 1 000 + 200 + 300 + 400 = 1 900; Q2 = 500 + 600 + 700 + 800 = 2 600
		// (the voided 10 000 counts nothing; 900 on 1 July is Q3); closing 4 500.
		// D-0102: 50 000 + (250 + 350) = 50 600.
		expect(figures(s)).toEqual({
			'D-0101': [1900, 2600, 4500],
			'D-0102': [50_000, 600, 50_600]
		});
		expect(s.totals).toMatchObject({
			openingShots: 51_900,
			periodShots: 3200,
			closingShots: 55_100
		});
		const d1 = s.dies.find((d) => d.number === 'D-0101')!;
		expect(d1.months.map((m) => [m.label, m.openingBalance, m.shots, m.closing])).toEqual([
			['Opening balance (before 2026-04-01)', true, 0, 1900],
			['April 2026', false, 1100, 3000],
			['May 2026', false, 700, 3700],
			['June 2026', false, 800, 4500]
		]);
		expect(s.dies.map((d) => d.number)).toEqual(['D-0101', 'D-0102']);
	});

	test('custom dates that cut a month at both ends: 20 March to 10 May 2026', async () => {
		const s = await statementFor({ kind: 'custom', from: '2026-03-20', to: '2026-05-10' });
		// Start: 20 Mar 00:00 Berlin = 19 Mar 23:00Z; end: 11 May 00:00 Berlin = 10 May 22:00Z.
		// D-0101: opening = 1 000 + 200 + 300 = 1 500; period = 400 + 500 + 600 + 700 = 2 200.
		// D-0102: opening 50 000; period = 250 (20 May is after the period).
		expect(figures(s)).toEqual({
			'D-0101': [1500, 2200, 3700],
			'D-0102': [50_000, 250, 50_250]
		});
		expect(s.totals).toMatchObject({
			openingShots: 51_500,
			periodShots: 2450,
			closingShots: 53_950
		});
		const d1 = s.dies.find((d) => d.number === 'D-0101')!;
		expect(d1.months.map((m) => [m.month, m.shots, m.closing])).toEqual([
			[null, 0, 1500],
			['2026-03', 400, 1900],
			['2026-04', 1100, 3000],
			['2026-05', 700, 3700]
		]);
	});

	test('a year that holds every entry closes at the register total', async () => {
		const s = await statementFor({ kind: 'year', year: 2026 });
		// D-0101: 1 000 + 200 + 300 + 400 + 500 + 600 + 700 + 800 + 900 = 5 400.
		expect(figures(s)['D-0101']).toEqual([0, 5400, 5400]);
		const totals = await db
			.selectFrom('dies')
			.select(['number', 'total_shots'])
			.where('number', 'in', ['D-0101', 'D-0102'])
			.orderBy('number')
			.execute();
		expect(totals.map((t) => t.total_shots)).toEqual(s.dies.map((d) => d.closingShots));
	});

	test('life, shots remaining and reorder-by come from the replacement outlook', async () => {
		const s = await statementFor({ kind: 'quarter', year: 2026, quarter: 2 });
		const d1 = s.dies.find((d) => d.number === 'D-0101')!;
		// A380 dies expect 125 000 shots (reference alloy); D-0101 has 5 400: 119 600 remain.
		expect(d1.shotsRemaining).toBe(119_600);
		expect(d1.lifeUsedPct).toBeCloseTo((100 * 5400) / 125_000, 6);
		expect(d1.leadDays).toBe(84);
		expect(d1.leadDaysFrom).toBe('family');
	});
});

describe('statement references', () => {
	test('one reference per owner, period and day; the next period gets the next number', async () => {
		const q2 = resolvePeriod({ kind: 'quarter', year: 2026, quarter: 2 });
		const may = resolvePeriod({ kind: 'month', year: 2026, month: 5 });
		const customer = { id: acme, code: 'ACME' };
		// NOW is 2 July 2026, 14:00 in Berlin.
		const first = await issueStatement(db, customer, q2, ADMIN, NOW);
		const again = await issueStatement(db, customer, q2, ADMIN, '2026-07-02T15:00:00.000Z');
		const second = await issueStatement(db, customer, may, ADMIN, NOW);
		expect(first.reference).toBe('ST-ACME-20260702-01');
		expect(again.reference).toBe('ST-ACME-20260702-01');
		expect(second.reference).toBe('ST-ACME-20260702-02');
		expect((await findIssuedStatement(db, acme, second.reference))?.period.label).toBe('May 2026');
		expect(await findIssuedStatement(db, acme + 1, second.reference)).toBeUndefined();
		expect((await listIssuedStatements(db, acme)).map((s) => s.reference)).toEqual([
			'ST-ACME-20260702-02',
			'ST-ACME-20260702-01'
		]);
	});

	test('a period form with a bad field names the field and the reason', () => {
		const bad = statementPeriodSchema.safeParse({ kind: 'quarter', year: '2026', quarter: '5' });
		expect(bad.success).toBe(false);
		expect(bad.error!.issues[0]).toMatchObject({
			path: ['quarter'],
			message: 'A quarter is 1 to 4.'
		});
		const backwards = statementPeriodSchema.safeParse({
			kind: 'custom',
			from: '2026-05-10',
			to: '2026-05-01'
		});
		expect(backwards.error!.issues[0]).toMatchObject({ path: ['to'] });
		const month = statementPeriodSchema.safeParse({ kind: 'month', year: '2026' });
		expect(month.error!.issues[0]).toMatchObject({ path: ['month'] });
	});
});

async function pdfText(s: PeriodStatement): Promise<{ text: string; pages: number }> {
	const pdf = await renderPeriodStatementPdf(s);
	const doc = await getDocumentProxy(new Uint8Array(pdf));
	const { text } = await extractText(doc, { mergePages: true });
	return { text, pages: doc.numPages };
}

function csvRecords(s: PeriodStatement): string[][] {
	const text = formatCsv(statementCsvHeader(s), statementCsvRows(s));
	return parse(text.replace(/^\uFEFF/, ''), { relax_column_count: false }) as string[][];
}

describe('the PDF and the CSV of a statement', () => {
	test('the PDF names the plant, the period, the reference and each die’s closing shots', async () => {
		const s = await statementFor({ kind: 'quarter', year: 2026, quarter: 2 });
		const { text, pages } = await pdfText(s);
		for (const expected of [
			'Kestrel Casting Works',
			'4 Foundry Lane, Northbridge',
			'tooling@kestrel.test',
			'Q2 2026 (April–June)',
			'2026-04-01 to 2026-06-30',
			'ST-ACME-TEST-quarter',
			'Acme Pumps',
			'4,500', // D-0101 closing
			'50,600', // D-0102 closing
			'55,100', // all dies closing
			'Page 1 of 1',
			'Kestrel Casting Works · tooling desk'
		]) {
			expect(text).toContain(expected);
		}
		expect(pages).toBe(1);
		expect(text).not.toContain('D-0201');
		expect(text).not.toMatch(/in_toolroom|on_track|\bready\b/);
	});

	test('the CSV has readable labels, an opening-balance row per die, codes only in machine columns', async () => {
		const s = await statementFor({ kind: 'quarter', year: 2026, quarter: 2 });
		const [header, ...rows] = csvRecords(s);
		expect(header).toContain('Opening shots');
		expect(header).toContain('Closing shots');
		expect(header.at(-2)).toBe('row_type (machine)');
		expect(header.at(-1)).toBe('status_code (machine)');
		const col = (name: string) => header.indexOf(name);
		const d1 = rows.filter((r) => r[col('Die')] === 'D-0101');
		// Die summary first, then the opening balance, then April, May, June.
		expect(d1.slice(0, 5).map((r) => r[col('Row')])).toEqual([
			'Die summary',
			'Opening balance (before 2026-04-01)',
			'April 2026',
			'May 2026',
			'June 2026'
		]);
		const opening = d1[1];
		expect(opening.at(-2)).toBe('opening_balance');
		// The balance brought forward is not a month's shots: the Shots cell is empty.
		expect(opening[col('Shots')]).toBe('');
		expect(opening[col('Closing shots')]).toBe('1900');
		expect(d1[2][col('Shots')]).toBe('1100');
		expect(d1[0][col('Status')]).toBe('Ready for production');
		expect(d1[0].at(-1)).toBe('ready');
		const total = rows.at(-1)!;
		expect(total[col('Row')]).toBe('All dies');
		expect([total[col('Opening shots')], total[col('Shots')], total[col('Closing shots')]]).toEqual(
			['51900', '3200', '55100']
		);
		// No internal code in a readable column.
		const readable = rows.flatMap((r) => r.slice(0, -2));
		expect(readable.join('|')).not.toMatch(/\b(ready|in_toolroom|on_track|opening_balance)\b/);
		expect(rows.some((r) => r[col('Die')] === 'D-0201')).toBe(false);
	});
});

describe('one service history', () => {
	test('portal, PDF and CSV agree on last service; billable repairs carry hours and cost', async () => {
		const d1 = ids.get('D-0101')!;
		const task = await db
			.selectFrom('service_tasks')
			.select(['id', 'kind'])
			.where('die_id', '=', d1)
			.where('kind', '=', 'stress_relief')
			.executeTakeFirstOrThrow();
		const die = await db
			.selectFrom('dies')
			.select(['id', 'status', 'total_shots'])
			.where('id', '=', d1)
			.executeTakeFirstOrThrow();
		const done = await markTaskDone(
			db,
			die,
			{ taskId: task.id, doneOn: '2026-05-02', shots: 3000 },
			ADMIN,
			NOW
		);
		expect(done.ok).toBe(true);
		// A billable repair the plant shared, closed on 15 May (3.5 h at 62.40 = 218.40 by hand).
		await db
			.insertInto('toolroom_jobs')
			.values({
				number: 'TJ-00077',
				die_id: d1,
				kind: 'repair',
				half: 'cover',
				description: 'INTERNAL crack weld',
				source: 'die',
				die_shots_at_open: 3600,
				opened_by: ADMIN,
				opened_at: '2026-05-14T08:00:00.000Z',
				updated_at: '2026-05-15T16:00:00.000Z',
				status: 'done',
				closed_at: '2026-05-15T16:00:00.000Z',
				die_shots_at_close: 3700,
				findings: 'SECRET findings',
				hours: 3.5,
				billable_to_owner: 1,
				owner_summary: 'Gate-side crack welded and polished.',
				summary_shared: 1
			})
			.execute();
		// D-0102: an inspection, not shared: the grade only.
		await db
			.insertInto('surface_inspections')
			.values({
				die_id: ids.get('D-0102')!,
				job_id: null,
				half: 'ejector',
				zone: 'SECRET zone name',
				shots_at: 50_300,
				grade: 2,
				longest_crack_mm: 4,
				notes: 'SECRET notes',
				inspected_by: ADMIN,
				inspected_at: '2026-06-03T09:00:00.000Z'
			})
			.execute();

		const s = await statementFor({ kind: 'quarter', year: 2026, quarter: 2 });
		const s1 = s.dies.find((d) => d.number === 'D-0101')!;
		const s2 = s.dies.find((d) => d.number === 'D-0102')!;
		expect(s1.services.map((e) => e.title)).toEqual([
			'Repair (toolroom job TJ-00077)',
			'Stress relief (service plan)'
		]);
		expect(s1.repairs).toEqual([
			expect.objectContaining({ jobNumber: 'TJ-00077', hours: 3.5, cost: 218.4 })
		]);
		expect(s.totals).toMatchObject({ repairHours: 3.5, repairCost: 218.4 });
		expect(s2.services.map((e) => [e.title, e.detail])).toEqual([
			['Surface inspection: grade 2 (Local crack network, tight)', null]
		]);
		expect(JSON.stringify(s)).not.toMatch(/SECRET|INTERNAL/);

		// The same words on every surface: the owner's die page, the PDF and the CSV.
		const expected = {
			'D-0101': '2026-05-15 · Repair (toolroom job TJ-00077)',
			'D-0102': '2026-06-03 · Surface inspection: grade 2 (Local crack network, tight)'
		};
		for (const [number, text] of Object.entries(expected)) {
			const owned = (await findOwnerDie(db, acme, number))!;
			const story = await getOwnerDieStory(db, owned, NOW);
			expect(lastServiceText(story.history.last)).toBe(text);
		}
		const { text } = await pdfText(s);
		for (const t of Object.values(expected)) expect(text).toContain(t);
		const [header, ...rows] = csvRecords(s);
		const col = (name: string) => header.indexOf(name);
		for (const [number, t] of Object.entries(expected)) {
			const summary = rows.find((r) => r[col('Die')] === number && r.at(-2) === 'die')!;
			expect(summary[col('Last service')]).toBe(t);
		}
		const repair = rows.find((r) => r.at(-2) === 'repair')!;
		expect([repair[col('Hours')], repair[col('Cost (EUR)')]]).toEqual(['3.5', '218.40']);
	});

	test('a plan task’s start is no service; a last-done date without a record is one', async () => {
		const d2 = ids.get('D-0102')!;
		// Created with the die on 1 Dec 2025: its last-done date is the plan's start.
		const none = await statementFor({ kind: 'year', year: 2025 });
		expect(none.dies.find((d) => d.id === d2)!.lastService).toBeNull();
		// A last-done date carried over from an older register (no completion in the trail).
		await db
			.updateTable('service_tasks')
			.set({ last_done_at: '2026-02-10T10:00:00.000Z', last_done_shots: 49_000 })
			.where('die_id', '=', d2)
			.where('kind', '=', 'cooling_flush')
			.execute();
		const s = await statementFor({ kind: 'month', year: 2026, month: 2 });
		const d = s.dies.find((x) => x.id === d2)!;
		expect(d.services.map((e) => e.title)).toEqual(['Cooling-line flush (service plan)']);
		expect(lastServiceText(d.lastService)).toBe('2026-02-10 · Cooling-line flush (service plan)');
	});
});
