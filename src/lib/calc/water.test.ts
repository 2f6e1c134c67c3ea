import { describe, expect, test } from 'vitest';
import {
	iapwsIf97Region1,
	iapwsIf97SaturationPressure,
	iapwsViscosity,
	waterProperties
} from './water';

const relative = (got: number, expected: number) => Math.abs(got / expected - 1);

describe('iapwsViscosity — IAPWS R12-08', () => {
	test('Table 4: 298.15 K, 998 kg/m³ → 889.735100 µPa·s', () => {
		expect(Math.abs(iapwsViscosity(298.15, 998) * 1e6 - 889.7351)).toBeLessThan(5e-7);
	});

	test('rejects non-positive inputs', () => {
		expect(() => iapwsViscosity(0, 998)).toThrow(RangeError);
		expect(() => iapwsViscosity(300, -1)).toThrow(RangeError);
	});
});

// IAPWS-IF97 Table 5 verification values for region 1 (*from memory*, see REFERENCES.md;
// tolerance 1e-6 relative).
describe('iapwsIf97Region1 — IAPWS-IF97 Table 5', () => {
	test.each([
		// T K, p MPa, v m³/kg, h kJ/kg, u kJ/kg, s kJ/(kg·K), cp kJ/(kg·K), w m/s
		[
			300, 3, 0.100215168e-2, 0.115331273e3, 0.112324818e3, 0.392294792, 0.417301218e1,
			0.150773921e4
		],
		[
			300, 80, 0.971180894e-3, 0.184142828e3, 0.106448356e3, 0.368563852, 0.401008987e1,
			0.163469054e4
		],
		[
			500, 3, 0.1202418e-2, 0.975542239e3, 0.971934985e3, 0.258041912e1, 0.465580682e1,
			0.124071337e4
		]
	])('T = %d K, p = %d MPa', (t, p, v, h, u, s, cp, w) => {
		const r = iapwsIf97Region1(t, p);
		expect(relative(r.specificVolume, v)).toBeLessThan(1e-6);
		expect(relative(r.density, 1 / v)).toBeLessThan(1e-6);
		expect(relative(r.specificEnthalpy, h)).toBeLessThan(1e-6);
		expect(relative(r.specificInternalEnergy, u)).toBeLessThan(1e-6);
		expect(relative(r.specificEntropy, s)).toBeLessThan(1e-6);
		expect(relative(r.specificHeatCp, cp)).toBeLessThan(1e-6);
		expect(relative(r.speedOfSound, w)).toBeLessThan(1e-6);
	});

	test('refuses steam and points outside region 1', () => {
		expect(() => iapwsIf97Region1(400, 0.1)).toThrow(/steam/);
		expect(() => iapwsIf97Region1(700, 30)).toThrow(RangeError);
		expect(() => iapwsIf97Region1(300, 120)).toThrow(RangeError);
	});
});

describe('iapwsIf97SaturationPressure — IAPWS-IF97 Table 35 (*from memory*, 1e-6 relative)', () => {
	test.each([
		[300, 0.353658941e-2],
		[500, 0.263889776e1],
		[600, 0.123443146e2]
	])('T = %d K → %f MPa', (t, p) => {
		expect(relative(iapwsIf97SaturationPressure(t), p)).toBeLessThan(1e-6);
	});

	test('boils at 100 °C under one standard atmosphere (ITS-90: 99.97 °C)', () => {
		expect(iapwsIf97SaturationPressure(373.12)).toBeCloseTo(0.101325, 4);
	});
});

describe('waterProperties — LSBU water data table (agrees within 0.5 %)', () => {
	test.each([
		// °C, ρ kg/m³, μ Pa·s, c_p J/(kg·K)
		[20, 998.2, 1.002e-3, 4184],
		[40, 992.2, 0.653e-3, 4179],
		[60, 983.2, 0.467e-3, 4185],
		[80, 971.8, 0.355e-3, 4197]
	])('%d °C', (c, rho, mu, cp) => {
		const w = waterProperties(c);
		expect(relative(w.density, rho)).toBeLessThan(0.005);
		expect(relative(w.viscosity, mu)).toBeLessThan(0.005);
		expect(relative(w.specificHeat, cp)).toBeLessThan(0.005);
	});

	test('above 100 °C at 1 atm the water is taken as pressurised saturated liquid', () => {
		const atAtmosphere = waterProperties(150);
		const atSaturation = waterProperties(150, iapwsIf97SaturationPressure(423.15));
		expect(atAtmosphere).toEqual(atSaturation);
		// Still liquid: far denser than steam, viscosity falling with temperature.
		expect(atAtmosphere.density).toBeGreaterThan(900);
		expect(atAtmosphere.viscosity).toBeLessThan(waterProperties(80).viscosity);
	});

	test('a higher circuit pressure barely changes liquid properties', () => {
		const low = waterProperties(60);
		const high = waterProperties(60, 1);
		expect(relative(high.density, low.density)).toBeLessThan(1e-3);
		expect(high.density).toBeGreaterThan(low.density);
	});

	test('throws RangeError outside 0.01–200 °C', () => {
		expect(() => waterProperties(0)).toThrow(RangeError);
		expect(() => waterProperties(201)).toThrow(RangeError);
		expect(() => waterProperties(Number.NaN)).toThrow(RangeError);
		expect(() => waterProperties(0.01)).not.toThrow();
		expect(() => waterProperties(200)).not.toThrow();
	});
});
