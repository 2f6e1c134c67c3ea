import { describe, expect, test } from 'vitest';
import { SURFACE_GRADES, crackTrend, splitCrackSeries } from './crack-trend';

// Ordinary least squares (any statistics text); lines chosen so the answer checks by hand.
describe('crackTrend', () => {
	test('an exact line grade = shots / 10 000 reaches grade 3 at 30 000 shots', () => {
		const trend = crackTrend([
			{ shots: 0, grade: 0 },
			{ shots: 10_000, grade: 1 },
			{ shots: 20_000, grade: 2 }
		]);
		expect(trend.slopePerShot).toBeCloseTo(1e-4, 15);
		expect(trend.intercept).toBeCloseTo(0, 12);
		expect(trend.projectedShotsAtRepair).toBe(30_000);
	});

	test('a scattered set: (0,0) (10 000,2) (20 000,2) → slope 1e-4, intercept 1/3, 26 667 shots', () => {
		// By hand: mean x 10 000, mean y 4/3; Sxy = 20 000, Sxx = 2e8 → slope 1e-4;
		// intercept 4/3 − 1 = 1/3; (3 − 1/3) / 1e-4 = 26 666.7 → 26 667.
		const trend = crackTrend([
			{ shots: 0, grade: 0 },
			{ shots: 10_000, grade: 2 },
			{ shots: 20_000, grade: 2 }
		]);
		expect(trend.slopePerShot).toBeCloseTo(1e-4, 15);
		expect(trend.intercept).toBeCloseTo(1 / 3, 12);
		expect(trend.projectedShotsAtRepair).toBe(26_667);
	});

	test('input order does not matter, and a lower repair grade comes sooner', () => {
		const points = [
			{ shots: 20_000, grade: 2 },
			{ shots: 0, grade: 0 },
			{ shots: 10_000, grade: 1 }
		];
		expect(crackTrend(points).projectedShotsAtRepair).toBe(30_000);
		expect(crackTrend(points, 4).projectedShotsAtRepair).toBe(40_000);
		expect(crackTrend(points, 2.5).projectedShotsAtRepair).toBe(25_000);
	});

	test('fewer than 3 distinct shot counts → no trend', () => {
		const trend = crackTrend([
			{ shots: 0, grade: 0 },
			{ shots: 10_000, grade: 1 },
			{ shots: 10_000, grade: 1 }
		]);
		expect(trend).toEqual({ slopePerShot: null, intercept: null, projectedShotsAtRepair: null });
		expect(crackTrend([])).toEqual({
			slopePerShot: null,
			intercept: null,
			projectedShotsAtRepair: null
		});
	});

	test('a flat or falling trend gives no projection', () => {
		const flat = crackTrend([
			{ shots: 0, grade: 1 },
			{ shots: 10_000, grade: 1 },
			{ shots: 20_000, grade: 1 }
		]);
		expect(flat.slopePerShot).toBe(0);
		expect(flat.projectedShotsAtRepair).toBeNull();
		const falling = crackTrend([
			{ shots: 0, grade: 2 },
			{ shots: 10_000, grade: 1 },
			{ shots: 20_000, grade: 1 }
		]);
		expect(falling.projectedShotsAtRepair).toBeNull();
	});

	test('already at the repair grade → the latest inspection’s shots, even without a trend', () => {
		expect(
			crackTrend([
				{ shots: 5_000, grade: 1 },
				{ shots: 40_000, grade: 3 }
			]).projectedShotsAtRepair
		).toBe(40_000);
	});

	test('a line that crossed the repair grade before the latest inspection says "now"', () => {
		// By hand: (0,0) (10 000,3) (10 000,3) (20 000,2): mean x 10 000, mean y 2, Sxy = 20 000,
		// Sxx = 2e8 → slope 1e-4, intercept 1; grade 2.5 at 15 000 shots, before the latest 20 000.
		const trend = crackTrend(
			[
				{ shots: 0, grade: 0 },
				{ shots: 10_000, grade: 3 },
				{ shots: 10_000, grade: 3 },
				{ shots: 20_000, grade: 2 }
			],
			2.5
		);
		expect(trend.slopePerShot).toBeCloseTo(1e-4, 15);
		expect(trend.intercept).toBeCloseTo(1, 12);
		expect(trend.projectedShotsAtRepair).toBe(20_000);
	});

	test('rejects grades outside 0–4 and a bad repair grade', () => {
		expect(() => crackTrend([{ shots: 0, grade: 5 }])).toThrow(RangeError);
		expect(() => crackTrend([{ shots: -1, grade: 1 }])).toThrow(RangeError);
		expect(() => crackTrend([], 0)).toThrow(RangeError);
	});
});

describe('SURFACE_GRADES (Castellan grading scale)', () => {
	test('five grades 0–4, the last calling for repair', () => {
		expect(SURFACE_GRADES.map((g) => g.grade)).toEqual([0, 1, 2, 3, 4]);
		expect(SURFACE_GRADES[0].description).toBe('No visible checking');
		expect(SURFACE_GRADES[4].description).toMatch(/repair before further production/);
	});
});

describe('splitCrackSeries — a zone restarts after a repair or a new half', () => {
	const pt = (shots: number, grade: number, at: string, halfSerial = 'D-1-C1') => ({
		shots,
		grade,
		longestCrackMm: grade * 2,
		at,
		halfSerial
	});
	const points = [
		pt(10_000, 1, '2026-01-10T08:00:00.000Z'),
		pt(20_000, 2, '2026-02-10T08:00:00.000Z'),
		pt(30_000, 3, '2026-03-10T08:00:00.000Z'),
		// Weld repair of the zone closes 2026-03-20; inspections after it start a new series.
		pt(32_000, 0, '2026-03-21T08:00:00.000Z'),
		pt(40_000, 1, '2026-04-21T08:00:00.000Z'),
		pt(48_000, 1, '2026-05-21T08:00:00.000Z')
	];
	const weld = { at: '2026-03-20T16:00:00.000Z', kind: 'weld', shots: 31_000 };

	test('a weld repair starts a new series; the earlier one keeps its own line', () => {
		const series = splitCrackSeries(points, [weld]);
		expect(series.map((s) => s.points.map((p) => p.shots))).toEqual([
			[10_000, 20_000, 30_000],
			[32_000, 40_000, 48_000]
		]);
		expect(series.map((s) => s.current)).toEqual([false, true]);
		expect(series[1].startedBy).toEqual({ kind: 'repair', repair: weld });
		// Before the weld: grades 1, 2, 3 at 10k, 20k, 30k lie on grade = 0.0001·shots exactly
		// (hand: slope = Σ(x−x̄)(y−ȳ)/Σ(x−x̄)² = (10 000·1 + 10 000·1)/(2·10 000²) = 1e-4).
		expect(series[0].trend.slopePerShot).toBeCloseTo(1e-4, 12);
		expect(series[0].trend.intercept).toBeCloseTo(0, 9);
		// After it: 0, 1, 1 at 32k, 40k, 48k; x̄ = 40 000, ȳ = 2/3;
		// Σ(x−x̄)(y−ȳ) = (−8 000)(−2/3) + 0 + (8 000)(1/3) = 8 000; Σ(x−x̄)² = 128 000 000;
		// slope = 6.25e-5 per shot — the projection uses only the repaired steel.
		expect(series[1].trend.slopePerShot).toBeCloseTo(6.25e-5, 12);
		// One line through all six would have mixed worn and repaired steel:
		const mixed = crackTrend(points.map((p) => ({ shots: p.shots, grade: p.grade })));
		expect(mixed.slopePerShot).not.toBeCloseTo(6.25e-5, 6);
	});

	test('another half (by serial) starts a new series without any repair', () => {
		const series = splitCrackSeries(
			[
				pt(10_000, 2, '2026-01-10T08:00:00.000Z'),
				pt(20_000, 3, '2026-02-10T08:00:00.000Z'),
				pt(25_000, 0, '2026-03-10T08:00:00.000Z', 'D-1-C2')
			],
			[]
		);
		expect(series.map((s) => [s.halfSerial, s.startedBy.kind, s.points.length])).toEqual([
			['D-1-C1', 'first', 2],
			['D-1-C2', 'new_half', 1]
		]);
	});

	test('without repairs or half changes, one series as before', () => {
		const series = splitCrackSeries(points.slice(0, 3), []);
		expect(series).toHaveLength(1);
		expect(series[0].current).toBe(true);
	});
});
