import { unit } from 'mathjs';
import { describe, expect, test } from 'vitest';
import {
	barToPsi,
	cToF,
	cm2ToIn2,
	deltaCToDeltaF,
	deltaFToDeltaC,
	fToC,
	formatArea,
	formatFlow,
	formatForce,
	formatLength,
	formatMass,
	formatPressure,
	formatTemperature,
	in2ToCm2,
	inToMm,
	kgToLb,
	lbToKg,
	lpmToUsGpm,
	mmToIn,
	psiToBar,
	usGpmToLpm
} from './units';

const VALUES = [0.5, 1, 8, 25.4, 100, 1234.5];
const relative = (got: number, expected: number) => Math.abs(got / expected - 1);

// Reference: mathjs unit definitions (US gallon, avoirdupois pound, psi = lbf/in²).
describe('conversions against mathjs', () => {
	test.each([
		['mm', 'in', mmToIn, inToMm],
		['L/min', 'gal/min', lpmToUsGpm, usGpmToLpm],
		['kg', 'lb', kgToLb, lbToKg],
		['cm^2', 'in^2', cm2ToIn2, in2ToCm2],
		['bar', 'psi', barToPsi, psiToBar]
	] as const)('%s ↔ %s', (si, us, toUs, toSi) => {
		for (const v of VALUES) {
			expect(relative(toUs(v), unit(v, si).toNumber(us))).toBeLessThan(1e-9);
			expect(relative(toSi(v), unit(v, us).toNumber(si))).toBeLessThan(1e-9);
		}
	});

	test('°C ↔ °F', () => {
		for (const c of [-40, 0, 20, 37, 100, 680]) {
			expect(cToF(c)).toBeCloseTo(unit(c, 'degC').toNumber('degF'), 9);
			expect(fToC(c)).toBeCloseTo(unit(c, 'degF').toNumber('degC'), 9);
		}
		expect(cToF(100)).toBeCloseTo(212, 12);
	});

	test('temperature differences scale without the 32 °F offset', () => {
		expect(deltaCToDeltaF(10)).toBeCloseTo(unit(10, 'K').toNumber('degR'), 9);
		expect(deltaFToDeltaC(18)).toBeCloseTo(10, 12);
	});
});

describe('display formatting', () => {
	test('force: kN in metric, US tons (2000 lbf) in US customary', () => {
		expect(formatForce(5000, 'metric')).toBe('5,000 kN');
		// 1000 US tons-force = 2 000 000 lbf = 8896.443 kN (mathjs lbf).
		const kn = unit(2_000_000, 'lbf').toNumber('kN');
		expect(formatForce(kn, 'us')).toBe('1,000 US tons');
		expect(formatForce(4000, 'us', 1)).toBe('449.6 US tons');
	});

	test('other quantities carry their unit symbol', () => {
		expect(formatLength(25.4, 'us')).toBe('1.000 in');
		expect(formatLength(8, 'metric')).toBe('8.0 mm');
		expect(formatFlow(37.85411784, 'us')).toBe('10.0 gal/min');
		expect(formatTemperature(100, 'us')).toBe('212 °F');
		expect(formatTemperature(40, 'metric')).toBe('40 °C');
		expect(formatMass(0.45359237, 'us')).toBe('1.00 lb');
		expect(formatArea(64.516, 'us')).toBe('10 in²');
		expect(formatPressure(800, 'us')).toBe('11,603 psi');
		expect(formatPressure(800, 'metric')).toBe('800 bar');
	});
});
