import { describe, expect, test } from 'vitest';
import {
	DEFAULT_EXPECTED_LIFE_BY_FAMILY,
	MAX_PLAUSIBLE_SHOTS_PER_HOUR,
	TYPICAL_SHOTS_PER_HOUR,
	lifeStatus
} from './life';

describe('plant defaults', () => {
	test('expected life and shot rates by family match the NADCA FAQ "Alloy properties"', () => {
		expect(DEFAULT_EXPECTED_LIFE_BY_FAMILY).toEqual({
			zinc: 500_000,
			magnesium: 200_000,
			aluminium: 125_000,
			copper: 20_000 // NADCA lists brass
		});
		expect(TYPICAL_SHOTS_PER_HOUR.zinc).toEqual({ min: 200, max: 550 });
		expect(TYPICAL_SHOTS_PER_HOUR.magnesium).toEqual({ min: 75, max: 400 });
		expect(TYPICAL_SHOTS_PER_HOUR.aluminium).toEqual({ min: 40, max: 200 });
		expect(TYPICAL_SHOTS_PER_HOUR.copper).toEqual({ min: 40, max: 200 });
	});

	test('every typical rate lies below the plausibility ceiling (common practice, 18 000/h)', () => {
		for (const range of Object.values(TYPICAL_SHOTS_PER_HOUR)) {
			expect(range.max).toBeLessThan(MAX_PLAUSIBLE_SHOTS_PER_HOUR);
		}
	});
});

describe('lifeStatus (plain arithmetic, hand-checked)', () => {
	const asOf = '2024-04-30T12:00:00Z';

	test('28 000 shots in the window → 1000/day; 25 000 left → 25 days later', () => {
		const status = lifeStatus({
			totalShots: 100_000,
			expectedLifeShots: 125_000,
			recentShots: [
				{ at: '2024-04-10T08:00:00Z', shots: 14_000 },
				{ at: '2024-04-29T08:00:00Z', shots: 14_000 }
			],
			asOf
		});
		expect(status.lifeUsedPct).toBeCloseTo(80, 12);
		expect(status.shotsRemaining).toBe(25_000);
		expect(status.shotsPerDay).toBeCloseTo(1000, 12);
		expect(status.projectedEndOfLife).toBe('2024-05-25');
	});

	test('window is (asOf − 28 d, asOf]: the start instant is out, asOf itself is in', () => {
		const status = lifeStatus({
			totalShots: 0,
			expectedLifeShots: 1_000_000,
			recentShots: [
				{ at: '2024-04-02T12:00:00Z', shots: 1_000 }, // exactly 28 days before: out
				{ at: '2024-04-02T12:00:01Z', shots: 28 }, // just inside
				{ at: '2024-04-30T12:00:00Z', shots: 28 }, // at asOf: in
				{ at: '2024-04-30T12:00:01Z', shots: 5_000 } // after asOf: out
			],
			asOf
		});
		expect(status.shotsPerDay).toBeCloseTo(2, 12);
	});

	test('bare dates count whole days: asOf 2024-04-30 covers 3–30 April', () => {
		const status = lifeStatus({
			totalShots: 0,
			expectedLifeShots: 1_000_000,
			recentShots: [
				{ at: '2024-04-02', shots: 9_999 },
				{ at: '2024-04-03', shots: 28 },
				{ at: '2024-04-30', shots: 28 },
				{ at: '2024-04-30T22:00:00Z', shots: 28 },
				{ at: '2024-05-01', shots: 9_999 }
			],
			asOf: '2024-04-30'
		});
		expect(status.shotsPerDay).toBeCloseTo(3, 12);
	});

	test('no shots in the window → rate 0 and no projected date', () => {
		const status = lifeStatus({
			totalShots: 10_000,
			expectedLifeShots: 125_000,
			recentShots: [{ at: '2023-01-01T00:00:00Z', shots: 10_000 }],
			asOf
		});
		expect(status.shotsPerDay).toBe(0);
		expect(status.projectedEndOfLife).toBeNull();
	});

	test('a die past its expected life: nothing remaining, end of life is the as-of date', () => {
		const status = lifeStatus({
			totalShots: 140_000,
			expectedLifeShots: 125_000,
			recentShots: [],
			asOf
		});
		expect(status.shotsRemaining).toBe(0);
		expect(status.lifeUsedPct).toBeCloseTo(112, 12);
		expect(status.projectedEndOfLife).toBe('2024-04-30');
	});

	test('a part day rounds up to the next whole day', () => {
		const status = lifeStatus({
			totalShots: 124_999,
			expectedLifeShots: 125_000,
			recentShots: [{ at: '2024-04-30T00:00:00Z', shots: 28_000 }],
			asOf
		});
		expect(status.projectedEndOfLife).toBe('2024-05-01');
	});

	test('net negative corrections do not give a negative rate', () => {
		const status = lifeStatus({
			totalShots: 0,
			expectedLifeShots: 1000,
			recentShots: [{ at: '2024-04-29T00:00:00Z', shots: -50 }],
			asOf
		});
		expect(status.shotsPerDay).toBe(0);
	});

	test('rejects an expected life of 0 and a bad date', () => {
		expect(() =>
			lifeStatus({ totalShots: 0, expectedLifeShots: 0, recentShots: [], asOf })
		).toThrow(RangeError);
		expect(() =>
			lifeStatus({ totalShots: 0, expectedLifeShots: 1, recentShots: [], asOf: 'soon' })
		).toThrow(RangeError);
	});
});
