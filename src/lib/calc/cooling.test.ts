import { describe, expect, test } from 'vitest';
import {
	flowPercentOfNominal,
	flowRegime,
	flowVelocity,
	heatRemovedKw,
	heatRemovedKwFor,
	isWeakFlow,
	reynoldsNumber,
	reynoldsNumberFor
} from './cooling';

const relative = (got: number, expected: number) => Math.abs(got / expected - 1);

// Worked by hand: 10 L/min = 1.666 667e-4 m³/s; an 8 mm bore has π·0.008²/4 = 5.026 548e-5 m²,
// so v = 3.315 728 m/s.
describe('flowVelocity (v = V̇ / A)', () => {
	test('10 L/min in an 8 mm bore → 3.315 728 m/s', () => {
		expect(flowVelocity({ flowLpm: 10, diameterMm: 8 })).toBeCloseTo(3.315728, 6);
	});

	test('halving the bore quadruples the velocity', () => {
		const wide = flowVelocity({ flowLpm: 10, diameterMm: 8 });
		expect(flowVelocity({ flowLpm: 10, diameterMm: 4 })).toBeCloseTo(4 * wide, 9);
	});

	test('rejects a zero bore and negative flow', () => {
		expect(() => flowVelocity({ flowLpm: 10, diameterMm: 0 })).toThrow(RangeError);
		expect(() => flowVelocity({ flowLpm: -1, diameterMm: 8 })).toThrow(RangeError);
	});
});

describe('reynoldsNumber (Re = ρ v d / μ)', () => {
	test('water, 10 L/min, 8 mm, 40 °C → 40 305 with LSBU table values (ρ 992.2, μ 0.653 mPa·s)', () => {
		// By hand: 992.2 × 3.315 728 × 0.008 / 0.000 653 = 40 304.6; IAPWS properties agree with
		// the LSBU table within 0.5 %.
		expect(
			relative(reynoldsNumber({ flowLpm: 10, diameterMm: 8, tempC: 40 }), 40_304.6)
		).toBeLessThan(0.005);
	});

	test('given properties (thermal oil ρ 870 kg/m³, μ 43.5 mPa·s) → 530.5, laminar', () => {
		// By hand: 870 × 3.315 728 × 0.008 / 0.0435 = 530.52.
		const re = reynoldsNumberFor({ flowLpm: 10, diameterMm: 8, density: 870, viscosity: 0.0435 });
		expect(re).toBeCloseTo(530.52, 2);
		expect(flowRegime(re)).toBe('laminar');
	});

	test('warmer water flows more freely: Re rises with temperature', () => {
		const cold = reynoldsNumber({ flowLpm: 10, diameterMm: 8, tempC: 20 });
		const hot = reynoldsNumber({ flowLpm: 10, diameterMm: 8, tempC: 80 });
		expect(hot).toBeGreaterThan(cold * 2);
	});
});

describe('flowRegime (2300 standard texts; 4000 die-cooling common practice)', () => {
	test.each([
		[0, 'laminar'],
		[2299, 'laminar'],
		[2300, 'transitional'],
		[3999, 'transitional'],
		[4000, 'turbulent'],
		[40_000, 'turbulent']
	] as const)('Re %d → %s', (re, regime) => {
		expect(flowRegime(re)).toBe(regime);
	});

	test('rejects a negative Reynolds number', () => {
		expect(() => flowRegime(-1)).toThrow(RangeError);
	});
});

describe('heat removed (Q = ρ · V̇ · c_p · ΔT)', () => {
	test('10 L/min warmed 35 → 45 °C → 6.911 kW with LSBU 40 °C values (ρ 992.2, c_p 4179)', () => {
		// By hand: 992.2 × 1.666 667e-4 × 4179 × 10 / 1000 = 6.9107 kW.
		expect(relative(heatRemovedKw({ flowLpm: 10, inletC: 35, outletC: 45 }), 6.9107)).toBeLessThan(
			0.005
		);
	});

	test('given properties: oil ρ 870, c_p 2000, 20 L/min, ΔT 5 K → 2.9 kW', () => {
		// By hand: 870 × (20/60 000) × 2000 × 5 / 1000 = 2.9 kW.
		expect(
			heatRemovedKwFor({ flowLpm: 20, inletC: 150, outletC: 155, density: 870, specificHeat: 2000 })
		).toBeCloseTo(2.9, 9);
	});

	test('an outlet colder than the inlet gives a negative figure', () => {
		expect(heatRemovedKw({ flowLpm: 10, inletC: 45, outletC: 35 })).toBeLessThan(0);
	});
});

describe('flow against nominal (weak below 80 %, common practice)', () => {
	test('7.9 of 10 L/min is 79 % and weak; 8 of 10 is 80 % and not', () => {
		expect(flowPercentOfNominal(7.9, 10)).toBeCloseTo(79, 9);
		expect(isWeakFlow(7.9, 10)).toBe(true);
		expect(isWeakFlow(8, 10)).toBe(false);
	});

	test('rejects a nominal flow of 0', () => {
		expect(() => flowPercentOfNominal(5, 0)).toThrow(RangeError);
	});
});
