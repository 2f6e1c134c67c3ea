import stdlibCdf from '@stdlib/stats-base-dists-weibull-cdf';
import stdlibQuantile from '@stdlib/stats-base-dists-weibull-quantile';
import { describe, expect, test } from 'vitest';
import {
	conditionalSurvival,
	fitWeibull,
	gamma,
	weibullB10,
	weibullCdf,
	weibullMean,
	weibullQuantile,
	weibullStdDev,
	weibullSurvival
} from './weibull';

// NIST/SEMATECH e-Handbook of Statistical Methods §8.4.1.3, "A Weibull maximum likelihood
// estimation example": 10 failures and 10 units removed unfailed at 500 h.
const NIST_FAILURES = [54, 187, 216, 240, 244, 335, 361, 373, 375, 386];
const NIST_SUSPENSIONS = Array.from({ length: 10 }, () => 500);

describe('fitWeibull — NIST/SEMATECH e-Handbook §8.4.1.3 example', () => {
	const fit = fitWeibull(NIST_FAILURES, NIST_SUSPENSIONS);

	test('shape 1.7208, scale 606.528 (to the printed digits)', () => {
		expect(Math.abs(fit.shape - 1.7208)).toBeLessThanOrEqual(5e-5);
		expect(Math.abs(fit.scale - 606.528)).toBeLessThanOrEqual(5e-4);
	});

	test('log-likelihood −75.135', () => {
		expect(Math.abs(fit.logLikelihood - -75.135)).toBeLessThanOrEqual(5e-4);
	});

	test('mean 540.737 and standard deviation 323.806', () => {
		expect(Math.abs(weibullMean(fit.shape, fit.scale) - 540.737)).toBeLessThanOrEqual(5e-4);
		expect(Math.abs(weibullStdDev(fit.shape, fit.scale) - 323.806)).toBeLessThanOrEqual(5e-4);
	});

	test('the estimate is a maximum: nudging either parameter lowers the likelihood', () => {
		// Same likelihood as the NIST convention, written out directly.
		const logL = (beta: number, eta: number) =>
			NIST_FAILURES.reduce(
				(s, t) => s + Math.log(beta / eta) + (beta - 1) * Math.log(t / eta) - (t / eta) ** beta,
				0
			) - NIST_SUSPENSIONS.reduce((s, t) => s + (t / eta) ** beta, 0);
		expect(logL(fit.shape, fit.scale)).toBeCloseTo(fit.logLikelihood, 10);
		for (const [db, de] of [
			[0.01, 0],
			[-0.01, 0],
			[0, 1],
			[0, -1]
		]) {
			expect(logL(fit.shape + db, fit.scale + de)).toBeLessThan(fit.logLikelihood);
		}
	});

	test('rescaling the ages rescales η and keeps β (shots vs thousands of shots)', () => {
		const scaled = fitWeibull(
			NIST_FAILURES.map((t) => t * 1000),
			NIST_SUSPENSIONS.map((t) => t * 1000)
		);
		expect(scaled.shape).toBeCloseTo(fit.shape, 9);
		expect(scaled.scale / 1000).toBeCloseTo(fit.scale, 6);
	});

	test('suspensions at age 0 (dies not yet run) change nothing', () => {
		const withNew = fitWeibull(NIST_FAILURES, [...NIST_SUSPENSIONS, 0, 0]);
		expect(withNew.shape).toBeCloseTo(fit.shape, 12);
		expect(withNew.scale).toBeCloseTo(fit.scale, 9);
		expect(withNew.logLikelihood).toBeCloseTo(fit.logLikelihood, 9);
	});
});

describe('fitWeibull — bad input', () => {
	test('fewer than 2 failures', () => {
		expect(() => fitWeibull([100], [200, 300])).toThrow(/at least 2 failures/);
		expect(() => fitWeibull([])).toThrow(Error);
	});

	test('non-positive or non-numeric ages', () => {
		expect(() => fitWeibull([0, 100])).toThrow(/positive/);
		expect(() => fitWeibull([-5, 100])).toThrow(/positive/);
		expect(() => fitWeibull([50, 100], [-1])).toThrow(/zero or positive/);
		expect(() => fitWeibull([50, Number.NaN])).toThrow(/positive/);
	});

	test('all failures at one age with nothing outliving them has no finite estimate', () => {
		expect(() => fitWeibull([100, 100, 100])).toThrow(/same age/);
		expect(() => fitWeibull([100, 100], [50])).toThrow(/same age/);
	});
});

describe('distribution functions against @stdlib/stats-base-dists-weibull-*', () => {
	const shapes = [0.5, 1, 1.7208, 3.5, 10];
	const scales = [1, 606.528, 125_000];

	test('weibullCdf and weibullSurvival over a grid', () => {
		for (const k of shapes) {
			for (const lambda of scales) {
				for (const f of [0, 0.01, 0.3, 1, 1.7, 4]) {
					const t = f * lambda;
					const expected = stdlibCdf(t, k, lambda);
					expect(weibullCdf(t, k, lambda)).toBeCloseTo(expected, 14);
					expect(weibullSurvival(t, k, lambda)).toBeCloseTo(1 - expected, 14);
				}
			}
		}
	});

	test('weibullQuantile over a grid (relative 1e-12)', () => {
		for (const k of shapes) {
			for (const lambda of scales) {
				for (const p of [0.001, 0.1, 0.5, 0.632, 0.9, 0.999]) {
					const expected = stdlibQuantile(p, k, lambda);
					expect(Math.abs(weibullQuantile(p, k, lambda) / expected - 1)).toBeLessThan(1e-12);
				}
				// At p = 0 the exact answer is 0; @stdlib returns a denormal-scale crumb for some β.
				expect(weibullQuantile(0, k, lambda)).toBe(0);
				expect(stdlibQuantile(0, k, lambda)).toBeLessThan(1e-30 * lambda);
			}
		}
	});

	test('B10 is the 10 % quantile', () => {
		expect(weibullB10(1.7208, 606.528)).toBeCloseTo(stdlibQuantile(0.1, 1.7208, 606.528), 9);
	});

	test('rejects non-positive parameters and p outside [0, 1]', () => {
		expect(() => weibullCdf(1, 0, 1)).toThrow(RangeError);
		expect(() => weibullSurvival(1, 1, -1)).toThrow(RangeError);
		expect(() => weibullQuantile(1.2, 1, 1)).toThrow(RangeError);
	});
});

describe('conditionalSurvival', () => {
	test('equals S(age + extra) / S(age) with S from @stdlib', () => {
		const [k, lambda] = [1.7208, 606.528];
		for (const age of [0, 100, 400, 900]) {
			for (const extra of [0, 50, 300]) {
				const expected = (1 - stdlibCdf(age + extra, k, lambda)) / (1 - stdlibCdf(age, k, lambda));
				expect(conditionalSurvival(age, extra, k, lambda)).toBeCloseTo(expected, 12);
			}
		}
	});

	test('the exponential case (β = 1) is memoryless: exp(−extra/η) at any age', () => {
		for (const age of [0, 1_000, 1_000_000]) {
			expect(conditionalSurvival(age, 500, 1, 1000)).toBeCloseTo(Math.exp(-0.5), 12);
		}
	});

	test('stays finite for old ages where S(age) underflows', () => {
		const p = conditionalSurvival(50_000, 100, 3, 1000);
		expect(p).toBeGreaterThanOrEqual(0);
		expect(Number.isNaN(p)).toBe(false);
	});
});

describe('gamma (Lanczos) against known values', () => {
	test('Γ(0.5) = √π, Γ(1) = 1, Γ(5) = 4! = 24, Γ(1.5) = √π/2, Γ(−0.5) = −2√π', () => {
		const rel = (a: number, b: number) => Math.abs(a / b - 1);
		expect(rel(gamma(0.5), Math.sqrt(Math.PI))).toBeLessThan(1e-14);
		expect(rel(gamma(1), 1)).toBeLessThan(1e-14);
		expect(rel(gamma(5), 24)).toBeLessThan(1e-14);
		expect(rel(gamma(1.5), Math.sqrt(Math.PI) / 2)).toBeLessThan(1e-14);
		expect(rel(gamma(-0.5), -2 * Math.sqrt(Math.PI))).toBeLessThan(1e-14);
		expect(rel(gamma(11), 3_628_800)).toBeLessThan(1e-13);
	});

	test('exponential distribution (β = 1): mean η and standard deviation η', () => {
		expect(weibullMean(1, 250)).toBeCloseTo(250, 10);
		expect(weibullStdDev(1, 250)).toBeCloseTo(250, 10);
	});
});
