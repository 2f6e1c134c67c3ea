import { unit } from 'mathjs';
import { describe, expect, test } from 'vitest';
import {
	DEFAULT_METAL_PRESSURE_BAR,
	checkMetalPressure,
	defaultMetalPressureBar,
	dieOpeningForceKn,
	knToTonneForce,
	knToUsTon,
	requiredClampForceKn,
	tonneForceToKn,
	usTonToKn
} from './clamp';
import { ALLOY_FAMILIES } from './life';

describe('clamping force — Giesserei-Lexikon "die opening force"', () => {
	test('500 cm² at 800 bar → opening force 4000 kN', () => {
		expect(dieOpeningForceKn({ projectedAreaCm2: 500, metalPressureBar: 800 })).toBeCloseTo(
			4000,
			9
		);
	});

	test('with slides k = 1.25 → 5000 kN; without slides k = 1.1 → 4400 kN', () => {
		const input = { projectedAreaCm2: 500, metalPressureBar: 800 };
		expect(requiredClampForceKn({ ...input, hasSlides: true })).toBeCloseTo(5000, 9);
		expect(requiredClampForceKn({ ...input, hasSlides: false })).toBeCloseTo(4400, 9);
	});

	test('rejects zero area or pressure', () => {
		expect(() => dieOpeningForceKn({ projectedAreaCm2: 0, metalPressureBar: 800 })).toThrow(
			RangeError
		);
		expect(() =>
			requiredClampForceKn({ projectedAreaCm2: 10, metalPressureBar: -1, hasSlides: false })
		).toThrow(RangeError);
	});
});

describe('force units against mathjs (1 tf = 9.80665 kN; 1 US ton-force = 2000 lbf)', () => {
	const kgfPerKn = unit(1, 'kN').toNumber('kgf');
	const usTonPerKn = unit(1, 'kN').toNumber('lbf') / 2000;

	test.each([1, 4000, 8.896443, 15_690.64])('%f kN', (kn) => {
		expect(knToTonneForce(kn) / ((kn * kgfPerKn) / 1000) - 1).toBeCloseTo(0, 12);
		expect(knToUsTon(kn) / (kn * usTonPerKn) - 1).toBeCloseTo(0, 12);
		expect(tonneForceToKn(knToTonneForce(kn))).toBeCloseTo(kn, 9);
		expect(usTonToKn(knToUsTon(kn))).toBeCloseTo(kn, 9);
	});

	test('the printed definitions: 1 tf = 9.80665 kN, 1 US ton = 8.896443 kN', () => {
		expect(tonneForceToKn(1)).toBeCloseTo(9.80665, 12);
		expect(usTonToKn(1)).toBeCloseTo(8.896443, 6);
	});
});

describe('metal pressure plausibility (REFERENCES.md process facts, common practice)', () => {
	test.each([
		['hot_chamber', 150, 'ok'],
		['hot_chamber', 350, 'ok'],
		['hot_chamber', 351, 'warn'],
		['hot_chamber', 6.9, 'reject'],
		['cold_chamber', 200, 'ok'],
		['cold_chamber', 1500, 'ok'],
		['cold_chamber', 199, 'warn'],
		['cold_chamber', 1501, 'warn'],
		['cold_chamber', 7001, 'reject'],
		['cold_chamber', Number.NaN, 'reject']
	] as const)('%s at %f bar → %s', (process, bar, level) => {
		const result = checkMetalPressure(process, bar);
		expect(result.level).toBe(level);
		expect(result.message.length).toBeGreaterThan(0);
	});

	test('every default pressure passes its own check', () => {
		expect(DEFAULT_METAL_PRESSURE_BAR.hot_chamber).toBe(150); // "around 15 MPa on average"
		for (const family of ALLOY_FAMILIES) {
			for (const process of ['hot_chamber', 'cold_chamber'] as const) {
				const bar = defaultMetalPressureBar(process, family);
				expect(checkMetalPressure(process, bar).level).toBe('ok');
			}
		}
	});
});
