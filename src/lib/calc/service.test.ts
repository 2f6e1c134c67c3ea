import { describe, expect, test } from 'vitest';
import { DEFAULT_EXPECTED_LIFE_BY_FAMILY, type AlloyFamily } from './life';
import {
	DEFAULT_SERVICE_TEMPLATES,
	SERVICE_KINDS,
	SERVICE_KIND_LABELS,
	SERVICE_STATES,
	dayIntervalDueMs,
	projectServiceDue,
	serviceState,
	serviceStateRank,
	taskDayCount
} from './service';

// Bands are plant practice (DESIGN.md "Service due"): coming up ≥ 90 %, due ≥ 100 %, overdue ≥ 110 %.
describe('serviceState (plant bands, hand-checked)', () => {
	const shotsOnly = { intervalShots: 10_000, intervalDays: null };

	test.each([
		[0, 'on_track'],
		[8_999, 'on_track'],
		[9_000, 'coming_up'],
		[9_999, 'coming_up'],
		[10_000, 'due'],
		[10_999, 'due'],
		[11_000, 'overdue']
	] as const)('%i of 10 000 shots → %s', (shotsSinceDone, state) => {
		expect(serviceState({ ...shotsOnly, shotsSinceDone, daysSinceDone: 0 }).state).toBe(state);
	});

	test('the worse of the two intervals decides', () => {
		const status = serviceState({
			intervalShots: 10_000,
			intervalDays: 30,
			shotsSinceDone: 2_000,
			daysSinceDone: 31
		});
		expect(status.fraction).toBeCloseTo(31 / 30, 12);
		expect(status.state).toBe('due');
		expect(status.shotsRemaining).toBe(8_000);
		expect(status.daysRemaining).toBe(-1);
	});

	test('remaining is null for an interval that is not set', () => {
		const status = serviceState({
			intervalShots: null,
			intervalDays: 90,
			shotsSinceDone: 50_000,
			daysSinceDone: 45
		});
		expect(status.shotsRemaining).toBeNull();
		expect(status.daysRemaining).toBe(45);
		expect(status.fraction).toBeCloseTo(0.5, 12);
		expect(status.state).toBe('on_track');
	});

	test('a custom threshold moves the coming-up band', () => {
		const input = { ...shotsOnly, shotsSinceDone: 8_000, daysSinceDone: 0 };
		expect(serviceState(input).state).toBe('on_track');
		expect(serviceState({ ...input, threshold: 0.75 }).state).toBe('coming_up');
	});

	test('rejects a task with no interval, a zero interval and a bad threshold', () => {
		const base = { shotsSinceDone: 0, daysSinceDone: 0 };
		expect(() => serviceState({ ...base, intervalShots: null, intervalDays: null })).toThrow(
			RangeError
		);
		expect(() => serviceState({ ...base, intervalShots: 0, intervalDays: null })).toThrow(
			RangeError
		);
		expect(() => serviceState({ ...base, ...shotsOnly, threshold: 1.5 })).toThrow(RangeError);
	});
});

describe('serviceStateRank', () => {
	test('sorts worst first', () => {
		expect(serviceStateRank('overdue')).toBe(3);
		expect(serviceStateRank('due')).toBe(2);
		expect(serviceStateRank('coming_up')).toBe(1);
		expect(serviceStateRank('on_track')).toBe(0);
		const sorted = (['on_track', 'due', 'overdue', 'coming_up'] as const)
			.slice()
			.sort((a, b) => serviceStateRank(b) - serviceStateRank(a));
		expect(sorted).toEqual([...SERVICE_STATES]);
	});
});

describe('projectServiceDue (hand-checked)', () => {
	const asOf = '2024-04-30T15:00:00Z';

	test('shot-based: 4 000 shots left at 1 000/day → 4 days', () => {
		expect(
			projectServiceDue({
				intervalShots: 10_000,
				intervalDays: null,
				shotsSinceDone: 6_000,
				daysSinceDone: 10,
				shotsPerDay: 1_000,
				asOf
			})
		).toBe('2024-05-04');
	});

	test('the earlier of shot- and day-based dates wins', () => {
		const input = {
			intervalShots: 10_000,
			intervalDays: 30,
			shotsSinceDone: 6_000,
			daysSinceDone: 28,
			shotsPerDay: 1_000,
			asOf
		};
		expect(projectServiceDue(input)).toBe('2024-05-02');
		expect(projectServiceDue({ ...input, daysSinceDone: 10 })).toBe('2024-05-04');
	});

	test('already past the interval → the as-of date', () => {
		expect(
			projectServiceDue({
				intervalShots: 10_000,
				intervalDays: 30,
				shotsSinceDone: 12_000,
				daysSinceDone: 5,
				shotsPerDay: 0,
				asOf
			})
		).toBe('2024-04-30');
	});

	test('shots only and the die not running → null', () => {
		expect(
			projectServiceDue({
				intervalShots: 10_000,
				intervalDays: null,
				shotsSinceDone: 6_000,
				daysSinceDone: 5,
				shotsPerDay: 0,
				asOf
			})
		).toBeNull();
	});
});

describe('due dates from the as-of instant, days counted alike on one row', () => {
	// Task done 23:00 UTC on 1 March 2026, interval 30 days, shots not the limit.
	const done = '2026-03-01T23:00:00.000Z';
	const base = { intervalShots: null, intervalDays: 30, shotsSinceDone: 0, shotsPerDay: 0 };

	test('task done 23:00 UTC, interval 30 days → due 31 March on a UTC plant, whatever the as-of hour', () => {
		// Hand calculation: 1 March + 30 days = 31 March (March has 31 days). The old way added
		// ceil(30 − age) days to the as-of *date*: as of 01:00 UTC on 10 March the age is
		// 8 d 2 h = 8.083 d, ceil(21.917) = 22, 10 March + 22 = 1 April — one day late.
		for (const asOf of ['2026-03-10T01:00:00.000Z', '2026-03-10T23:30:00.000Z']) {
			const days = taskDayCount(done, asOf);
			expect(projectServiceDue({ ...base, daysSinceDone: days, asOf, lastDoneAt: done })).toBe(
				'2026-03-31'
			);
		}
		// Without the completion time, from the exact age: 01:00 on 10 March + 21.917 d
		// = 31 March 23:00 UTC → still 31 March.
		const asOf = '2026-03-10T01:00:00.000Z';
		const age = (Date.parse(asOf) - Date.parse(done)) / 86_400_000;
		expect(projectServiceDue({ ...base, daysSinceDone: age, asOf })).toBe('2026-03-31');
	});

	test('days since done and days remaining are whole plant days that add up to the interval', () => {
		// UTC plant, as of 01:00 on 10 March: dates 1 → 10 March = 9 days since, 30 − 9 = 21 left,
		// and 10 March + 21 days = 31 March, the projected date.
		const asOf = '2026-03-10T01:00:00.000Z';
		const since = taskDayCount(done, asOf);
		const status = serviceState({ ...base, daysSinceDone: since });
		expect(since).toBe(9);
		expect(status.daysRemaining).toBe(21);
		expect(since + status.daysRemaining!).toBe(30);
	});

	test('on a Vienna plant the same task is done on 2 March and due on 1 April', () => {
		// 23:00 UTC on 1 March is 00:00 on 2 March in Vienna (UTC+1). 2 March + 30 days = 1 April,
		// which starts at 00:00 summer time (UTC+2) = 22:00 UTC on 31 March.
		const zone = 'Europe/Vienna';
		const asOf = '2026-03-10T01:00:00.000Z'; // 02:00 on 10 March in Vienna
		const since = taskDayCount(done, asOf, zone);
		expect(since).toBe(8); // 2 → 10 March
		expect(serviceState({ ...base, daysSinceDone: since }).daysRemaining).toBe(22);
		expect(projectServiceDue({ ...base, daysSinceDone: since, asOf, lastDoneAt: done, zone })).toBe(
			'2026-04-01'
		);
		expect(new Date(dayIntervalDueMs(done, 30, zone)).toISOString()).toBe(
			'2026-03-31T22:00:00.000Z'
		);
	});

	test('shot-based projection runs from the as-of instant, not its date', () => {
		// 1 200 shots left at 1 000/day from 02:00 UTC on 10 March = 1.2 d = 28 h 48 min
		// → 11 March 06:48 UTC. The old way: 10 March + ceil(1.2) = 12 March.
		expect(
			projectServiceDue({
				intervalShots: 10_000,
				intervalDays: null,
				shotsSinceDone: 8_800,
				daysSinceDone: 0,
				shotsPerDay: 1_000,
				asOf: '2026-03-10T02:00:00.000Z'
			})
		).toBe('2026-03-11');
	});
});

describe('default service plan (plant defaults; stress relief per REFERENCES.md, from memory)', () => {
	const families = Object.keys(DEFAULT_SERVICE_TEMPLATES) as AlloyFamily[];

	test('every family has each kind once, with a label and at least one positive interval', () => {
		for (const family of families) {
			const kinds = DEFAULT_SERVICE_TEMPLATES[family].map((t) => t.kind).sort();
			expect(kinds).toEqual([...SERVICE_KINDS].sort());
			for (const t of DEFAULT_SERVICE_TEMPLATES[family]) {
				expect(SERVICE_KIND_LABELS[t.kind].length).toBeGreaterThan(0);
				expect(t.intervalShots !== null || t.intervalDays !== null).toBe(true);
				for (const v of [t.intervalShots, t.intervalDays]) {
					if (v !== null) expect(v).toBeGreaterThan(0);
				}
			}
		}
	});

	test('stress relief comes within the 10 000–30 000 shot guidance, brass aside', () => {
		for (const family of families) {
			const relief = DEFAULT_SERVICE_TEMPLATES[family].find((t) => t.kind === 'stress_relief');
			const shots = relief?.intervalShots ?? 0;
			if (family === 'copper') expect(shots).toBeLessThan(DEFAULT_EXPECTED_LIFE_BY_FAMILY.copper);
			else {
				expect(shots).toBeGreaterThanOrEqual(10_000);
				expect(shots).toBeLessThanOrEqual(30_000);
			}
		}
	});

	test('a die meets every shot-based task before its NADCA average life runs out', () => {
		for (const family of families) {
			for (const t of DEFAULT_SERVICE_TEMPLATES[family]) {
				if (t.intervalShots !== null) {
					expect(t.intervalShots).toBeLessThan(DEFAULT_EXPECTED_LIFE_BY_FAMILY[family]);
				}
			}
		}
	});
});
