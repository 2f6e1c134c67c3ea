// Plant time: the plant's zone decides where its days begin (daily roll-up, shots/day, service
// days, "today") and how times without an offset are read, while storage stays UTC.
//
// Zones used, with their offsets from the IANA time zone database (tzdata) as the runtime ships
// it: Australia/Brisbane is UTC+10 all year (Queensland keeps no summer time); Europe/Vienna is
// UTC+1, and UTC+2 in summer time from the last Sunday of March 01:00 UTC to the last Sunday of
// October 01:00 UTC (EU Directive 2000/84/EC) — 2026-03-29 and 2026-10-25.
import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import { formatDate } from '../../src/lib/format';
import { plantTimestamp, setPlantZone } from '../../src/lib/plant-time';
import { composeDigest } from '../../src/lib/server/notices/digest';
import { dieLife, findDie, cumulativeShotSeries } from '../../src/lib/server/dies/die-detail';
import { listServicePlan, markTaskDone } from '../../src/lib/server/dies/service-plan';
import { getPlantTimeZone, savePlantTimeZone } from '../../src/lib/server/settings/plant-time';
import { ingestShotBody } from '../../src/lib/server/shots/api-ingest';
import { parseShotCsv } from '../../src/lib/server/shots/csv-upload';
import { recordShots } from '../../src/lib/server/shots/ledger';
import { LEAD, makeShotPlant, plant, type ShotPlant } from './shots-fixture';

let p: ShotPlant;
beforeEach(async () => {
	p = await makeShotPlant();
});
afterEach(() => setPlantZone('UTC'));

async function dailyRows(dieId: number) {
	return p.db
		.selectFrom('shot_daily')
		.select(['day', 'shots'])
		.where('die_id', '=', dieId)
		.orderBy('day')
		.execute();
}

async function storedTimes(dieId: number) {
	const rows = await p.db
		.selectFrom('shot_entries')
		.select('counted_at')
		.where('die_id', '=', dieId)
		.orderBy('id')
		.execute();
	return rows.map((r) => r.counted_at);
}

describe('the plant time zone setting', () => {
	test('a new database runs on UTC; an unknown zone is refused and changes nothing', async () => {
		expect(await getPlantTimeZone(p.db)).toBe('UTC');
		const r = await savePlantTimeZone(p.db, 'Mars/Olympus_Mons', LEAD);
		expect(r).toEqual({
			ok: false,
			message: '"Mars/Olympus_Mons" is not a time zone; pick one from the list.'
		});
		expect(await getPlantTimeZone(p.db)).toBe('UTC');
		const audit = await p.db.selectFrom('audit_log').select('action').execute();
		expect(audit).toEqual([]);
	});

	test('changing the zone regroups the daily roll-up by the new days, and is audited', async () => {
		// Two runs on the same UTC day, 2026-06-09: 50 shots at 12:00 UTC, 100 at 21:30 UTC.
		const counted = await recordShots(
			p.db,
			[
				{ die: 'Z-0001', shots: 50, countedAt: '2026-06-09T12:00:00Z' },
				{ die: 'Z-0001', shots: 100, countedAt: '2026-06-09T21:30:00Z' }
			],
			plant,
			{ source: 'manual', now: '2026-06-10T00:00:00.000Z' }
		);
		expect(counted.ok).toBe(true);
		expect(await dailyRows(p.dies.zinc)).toEqual([{ day: '2026-06-09', shots: 150 }]);

		// In Brisbane (UTC+10): 12:00 UTC is 22:00 on the 9th; 21:30 UTC is 07:30 on the 10th.
		expect(await savePlantTimeZone(p.db, 'Australia/Brisbane', LEAD)).toEqual({
			ok: true,
			message:
				'Plant time zone set to Australia/Brisbane; daily shot totals regrouped by the new days.'
		});
		expect(await dailyRows(p.dies.zinc)).toEqual([
			{ day: '2026-06-09', shots: 50 },
			{ day: '2026-06-10', shots: 100 }
		]);
		// The stored instants do not move.
		expect(await storedTimes(p.dies.zinc)).toEqual([
			'2026-06-09T12:00:00.000Z',
			'2026-06-09T21:30:00.000Z'
		]);
		const audit = await p.db
			.selectFrom('audit_log')
			.select(['action', 'user_id', 'detail'])
			.where('action', '=', 'settings.time_zone')
			.execute();
		expect(audit).toEqual([
			{
				action: 'settings.time_zone',
				user_id: LEAD,
				detail: JSON.stringify({ from: 'UTC', to: 'Australia/Brisbane', rollupRows: 2 })
			}
		]);

		// Back to UTC: one day again, and the roll-up still sums to the die total.
		await savePlantTimeZone(p.db, 'UTC', LEAD);
		expect(await dailyRows(p.dies.zinc)).toEqual([{ day: '2026-06-09', shots: 150 }]);
	});
});

describe('a UTC+10 plant (Australia/Brisbane)', () => {
	beforeEach(async () => {
		await savePlantTimeZone(p.db, 'Australia/Brisbane', LEAD);
	});

	test('the same shots entered at 23:30 local time fall on the local day, by form, API and CSV', async () => {
		// Hand calculation: 23:30 on 9 June at UTC+10 is 23:30 − 10:00 = 13:30 UTC on 9 June.
		// Read as UTC (as before), "23:30" would have been 09:30 on 10 June at the plant.
		const now = '2026-06-09T14:00:00.000Z'; // 00:00 on 10 June in Brisbane
		const form = await recordShots(
			p.db,
			[{ die: 'Z-0001', shots: 120, countedAt: '2026-06-09T23:30' }],
			plant,
			{ source: 'manual', now }
		);
		// The API body as a press gateway sends it, without an offset.
		const api = await ingestShotBody(
			p.db,
			{ die: 'A-0001', shots: 120, countedAt: '2026-06-09T23:30:00' },
			plant,
			now
		);
		expect(api.status).toBe(201);
		const csv = parseShotCsv('die,counted_at,shots\nB-0001,2026-06-09 23:30,120\n');
		expect(csv.ok).toBe(true);
		if (!csv.ok) return;
		expect(csv.rows[0].input?.countedAt).toBe('2026-06-09T13:30:00.000Z');
		const fromCsv = await recordShots(p.db, [csv.rows[0].input!], plant, {
			source: 'csv',
			now
		});
		expect([form.ok, fromCsv.ok]).toEqual([true, true]);

		for (const dieId of [p.dies.zinc, p.dies.alu, p.dies.bolt]) {
			expect(await storedTimes(dieId)).toEqual(['2026-06-09T13:30:00.000Z']);
			expect(await dailyRows(dieId)).toEqual([{ day: '2026-06-09', shots: 120 }]);
		}

		// 07:30 the next morning is 21:30 UTC on the 9th, but the plant's 10 June.
		await recordShots(p.db, [{ die: 'Z-0001', shots: 80, countedAt: '2026-06-10T07:30' }], plant, {
			source: 'manual',
			now: '2026-06-09T22:00:00.000Z'
		});
		expect(await dailyRows(p.dies.zinc)).toEqual([
			{ day: '2026-06-09', shots: 120 },
			{ day: '2026-06-10', shots: 80 }
		]);

		// Shots per day and the chart read those plant days.
		const die = (await findDie(p.db, 'Z-0001', { customerId: null }))!;
		expect(await cumulativeShotSeries(p.db, die.id, die.total_shots)).toEqual([
			{ day: '2026-06-09', total: 120 },
			{ day: '2026-06-10', total: 200 }
		]);
		// Trailing 28-day rate at 12:00 on 10 June plant time (02:00 UTC): both days' noons
		// (02:00 UTC on the 9th and on the 10th) lie in the window, so 200 shots / 28 d.
		const life = await dieLife(p.db, die, '2026-06-10T02:00:00.000Z');
		expect(life.shotsPerDay).toBeCloseTo(200 / 28, 9);
	});

	test('a morning user can mark a task done today (plant date), not tomorrow', async () => {
		await p.db
			.insertInto('service_tasks')
			.values({
				die_id: p.dies.zinc,
				kind: 'cooling_flush',
				interval_shots: null,
				interval_days: 90,
				last_done_at: '2026-03-01T00:00:00.000Z'
			})
			.execute();
		const [task] = await p.db.selectFrom('service_tasks').select('id').execute();
		const die = { id: p.dies.zinc, status: 'ready' as const, total_shots: 0 };
		// 08:30 on 10 June in Brisbane is 22:30 UTC on 9 June: "today" is the 10th at the plant.
		const now = '2026-06-09T22:30:00.000Z';
		const ok = await markTaskDone(
			p.db,
			die,
			{ taskId: task.id, doneOn: '2026-06-10', shots: 0 },
			LEAD,
			now
		);
		expect(ok.ok).toBe(true);
		const tomorrow = await markTaskDone(
			p.db,
			die,
			{ taskId: task.id, doneOn: '2026-06-11', shots: 0 },
			LEAD,
			now
		);
		expect(tomorrow).toEqual({
			ok: false,
			status: 400,
			field: 'doneOn',
			message:
				'The date cannot be in the future (today is 2026-06-10 at the plant, Australia/Brisbane).'
		});
	});

	test('days since done and days remaining count plant days and add up to the interval', async () => {
		// Done at 23:00 UTC on 1 March = 09:00 on 2 March in Brisbane; interval 30 days.
		await p.db
			.insertInto('service_tasks')
			.values({
				die_id: p.dies.zinc,
				kind: 'surface_inspection',
				interval_shots: null,
				interval_days: 30,
				last_done_at: '2026-03-01T23:00:00.000Z'
			})
			.execute();
		const die = { id: p.dies.zinc, status: 'ready' as const, total_shots: 0 };
		// As of 01:00 UTC on 10 March = 11:00 on 10 March in Brisbane.
		// Plant days since done: 2 March → 10 March = 8; remaining 30 − 8 = 22;
		// due on 2 March + 30 days = 1 April (March has 31 days: 2 + 30 = 32 → 1 April).
		const { tasks } = await listServicePlan(p.db, die, 0, '2026-03-10T01:00:00.000Z');
		expect(tasks[0]).toMatchObject({
			daysSinceDone: 8,
			daysRemaining: 22,
			projectedDue: '2026-04-01',
			state: 'on_track'
		});
	});
});

describe('a plant in Central Europe (Europe/Vienna)', () => {
	beforeEach(async () => {
		await savePlantTimeZone(p.db, 'Europe/Vienna', LEAD);
	});

	test('a clock time skipped when summer time starts is refused, not moved', async () => {
		// On 29 March 2026 Vienna clocks go from 02:00 to 03:00: 02:30 does not exist.
		const r = await recordShots(
			p.db,
			[{ die: 'Z-0001', shots: 10, countedAt: '2026-03-29T02:30' }],
			plant,
			{ source: 'manual', now: '2026-03-29T12:00:00.000Z' }
		);
		expect(r).toEqual({
			ok: false,
			issues: [
				{
					index: 0,
					field: 'countedAt',
					message:
						'2026-03-29 02:30 does not exist in Europe/Vienna (the clocks skip that hour when summer time starts).'
				}
			]
		});
		// 03:30 summer time (UTC+2) is 01:30 UTC.
		const ok = await recordShots(
			p.db,
			[{ die: 'Z-0001', shots: 10, countedAt: '2026-03-29T03:30' }],
			plant,
			{ source: 'manual', now: '2026-03-29T12:00:00.000Z' }
		);
		expect(ok.ok).toBe(true);
		expect(await storedTimes(p.dies.zinc)).toEqual(['2026-03-29T01:30:00.000Z']);
	});
});

describe('e-mail, export and page agree on plant time', () => {
	test('a notice digest, the CSV timestamp and the page date give the same plant day', () => {
		setPlantZone('Europe/Vienna');
		// 23:30 UTC on 1 March is 00:30 on 2 March in Vienna (UTC+1 in winter).
		const asOf = '2026-03-01T23:30:00.000Z';
		const mail = composeDigest(
			[
				{
					level: 'due',
					subject: 'D-0001 · Stress relief · due',
					dieNumber: 'D-0001',
					payload: {
						kind: 'service',
						dieNumber: 'D-0001',
						partName: 'Part 1',
						customerName: 'Testbury',
						taskId: 1,
						taskKind: 'stress_relief',
						state: 'due',
						fraction: 1,
						intervalShots: 15_000,
						intervalDays: null,
						shotsRemaining: 0,
						daysRemaining: null,
						lastDoneAt: asOf
					}
				}
			],
			{ origin: 'https://c.test', asOf }
		);
		expect(mail.text).toContain('Service notice, 2026-03-02');
		expect(mail.text).toContain('(last done 2026-03-02)');
		expect(mail.text.match(/Europe\/Vienna/g)).toHaveLength(1);
		expect(plantTimestamp(asOf)).toBe('2026-03-02T00:30:00+01:00');
		expect(formatDate(asOf)).toBe('2026-03-02');
		// The CSV timestamp reads back to the stored instant.
		expect(new Date(plantTimestamp(asOf)).toISOString()).toBe(asOf);
	});
});
