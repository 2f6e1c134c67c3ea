import { describe, expect, test } from 'vitest';
import { ALLOY_PROPERTY_DEFAULTS, dieHeatBalance, heatPerKgJ, heatPerShotKj } from './heat-balance';

describe('heatPerShotKj — sensible + latent + freezing-range heat, A380 figures from NADCA tables A-3-2', () => {
	// A380 per NADCA A-3-2: c = 963 J/(kg·K), melting range 540–595 °C; L ≈ 389 J/g (data sheet).
	// Hand example with one specific heat for liquid and solid: 2 kg poured at 680 °C, ejected at
	// 300 °C:
	//   liquid        963 · (680 − 595) =  81 855
	//   latent                           389 000
	//   freezing range 963 · (595 − 540) =  52 965   (mean of 963 and 963)
	//   solid         963 · (540 − 300) = 231 120
	//   total                            754 940 J/kg, × 2 kg = 1 509 880 J = 1509.88 kJ.
	const a380 = {
		shotMassKg: 2,
		pourC: 680,
		liquidusC: 595,
		solidusC: 540,
		ejectC: 300,
		cpLiquid: 963,
		cpSolid: 963,
		latentHeatJPerKg: 389_000
	};

	test('2 kg of A380, 680 → 300 °C, one specific heat → 1509.88 kJ', () => {
		expect(heatPerShotKj(a380)).toBeCloseTo(1509.88, 9);
	});

	test('A380 from Castellan’s constants (liquid 1 177, solid 963 J/(kg·K)), 680 → 300 °C, per kg', () => {
		// Hand calculation, constants from ALLOY_PROPERTY_DEFAULTS.A380 and their sources:
		//   liquid         1 177 · (680 − 595) = 1 177 · 85  = 100 045
		//   latent                                           389 000
		//   freezing range (1 177 + 963)/2 = 1 070; 1 070 · 55 =  58 850
		//   solid            963 · (540 − 300) =  963 · 240  = 231 120
		//   total                                            779 015 J/kg
		const d = ALLOY_PROPERTY_DEFAULTS.A380;
		expect([d.cpLiquid, d.cpSolid, d.liquidusC, d.solidusC, d.latentHeatJPerKg]).toEqual([
			1177, 963, 595, 540, 389_000
		]);
		expect(
			heatPerKgJ({
				pourC: 680,
				liquidusC: d.liquidusC,
				solidusC: d.solidusC,
				ejectC: 300,
				cpLiquid: d.cpLiquid,
				cpSolid: d.cpSolid,
				latentHeatJPerKg: d.latentHeatJPerKg
			})
		).toBeCloseTo(779_015, 6);
	});

	test('pure aluminium, liquid at 700 °C to solid at its melting point, against handbook enthalpies', () => {
		// Published values (NIST-JANAF Thermochemical Tables for Al, and the CRC Handbook's enthalpy
		// of fusion — both from memory, so 1 % tolerance): melting point 933.47 K (660.32 °C, the
		// ITS-90 fixed point), ΔfusH = 10.71 kJ/mol, liquid Cp = 31.75 J/(mol·K), M = 26.9815 g/mol.
		// H(973.15 K, l) − H(933.47 K, s) = 31.75 · 39.68 + 10 710 = 11 969.8 J/mol
		//   = 11 969.8 / 0.0269815 = 443 630 J/kg.
		// A pure metal has no freezing range: liquidus = solidus = eject = 660.32 °C.
		const perKg = heatPerKgJ({
			pourC: 700,
			liquidusC: 660.32,
			solidusC: 660.32,
			ejectC: 660.32,
			cpLiquid: 31.75 / 0.0269815,
			cpSolid: 24.2 / 0.0269815, // unused here: no solid cooling
			latentHeatJPerKg: 10_710 / 0.0269815
		});
		expect(Math.abs(perKg - 443_630) / 443_630).toBeLessThan(0.01);
	});

	test('AZ91D: the freezing range carries a sixth of the heat a single-c, no-range sum leaves out', () => {
		// AZ91D defaults: c_l 1 411, c_s 1 050, liquidus 595, solidus 470, L 350 000; pour 660, eject 300.
		//   liquid  1 411 · 65           =  91 715
		//   latent                          350 000
		//   range   (1 411 + 1 050)/2 = 1 230.5; · 125 = 153 812.5
		//   solid   1 050 · 170          = 178 500
		//   total                           774 027.5 J/kg
		// The old sum (1 050 for the liquid, no range term): 68 250 + 350 000 + 178 500 = 596 750,
		// 77 % of it — cooling sized on the old figure would read about a quarter too generous.
		const d = ALLOY_PROPERTY_DEFAULTS.AZ91D;
		const q = heatPerKgJ({
			pourC: 660,
			liquidusC: d.liquidusC,
			solidusC: d.solidusC,
			ejectC: 300,
			cpLiquid: d.cpLiquid,
			cpSolid: d.cpSolid,
			latentHeatJPerKg: d.latentHeatJPerKg
		});
		expect(q).toBeCloseTo(774_027.5, 6);
		expect(596_750 / q).toBeCloseTo(0.771, 3);
	});

	test('the A380 defaults give 2 × 779 015 J for 2 kg', () => {
		const d = ALLOY_PROPERTY_DEFAULTS.A380;
		expect(
			heatPerShotKj({
				shotMassKg: 2,
				pourC: d.pourC,
				liquidusC: d.liquidusC,
				solidusC: d.solidusC,
				ejectC: 300,
				cpLiquid: d.cpLiquid,
				cpSolid: d.cpSolid,
				latentHeatJPerKg: d.latentHeatJPerKg
			})
		).toBeCloseTo(1558.03, 9);
	});

	test.each([
		[{ pourC: 590 }, /pouring/],
		[{ ejectC: 560 }, /ejection/],
		[{ liquidusC: 530 }, /liquidus/],
		[{ shotMassKg: 0 }, /Shot mass/],
		[{ latentHeatJPerKg: -1 }, /Latent/]
	])('rejects %o', (change, message) => {
		expect(() => heatPerShotKj({ ...a380, ...change })).toThrow(message);
	});
});

describe('dieHeatBalance — heat in = kJ/shot × shots/h / 3600', () => {
	// Hand example: 1403.95 kJ × 60 shots/h / 3600 = 23.399 kW.
	test('60 shots/h of the A380 example bring 23.399 kW', () => {
		const result = dieHeatBalance({ heatPerShotKj: 1403.95, shotsPerHour: 60, coolingKw: 20 });
		expect(result.heatInKw).toBeCloseTo(23.399167, 5);
		expect(result.ratio).toBeCloseTo(0.854731, 6); // 20 / 23.399 17
		expect(result.verdict).toBe('balanced');
	});

	test.each([
		[15, 'cooling_short'], // 64 %
		[18.8, 'balanced'], // 80.3 %
		[28, 'balanced'], // 119.7 %
		[30, 'ample'] // 128 %
	] as const)('%f kW of cooling → %s', (coolingKw, verdict) => {
		expect(dieHeatBalance({ heatPerShotKj: 1403.95, shotsPerHour: 60, coolingKw }).verdict).toBe(
			verdict
		);
	});

	test('the message states the figures in plain words and says it is a planning aid', () => {
		const { message } = dieHeatBalance({ heatPerShotKj: 1403.95, shotsPerHour: 60, coolingKw: 15 });
		expect(message).toContain('15.0 kW');
		expect(message).toContain('23.4 kW');
		expect(message).toContain('64 %');
		expect(message).toMatch(/spray/);
		expect(message).toMatch(/Planning aid/);
	});

	test('rejects zero shots per hour and negative cooling', () => {
		expect(() => dieHeatBalance({ heatPerShotKj: 100, shotsPerHour: 0, coolingKw: 1 })).toThrow(
			RangeError
		);
		expect(() => dieHeatBalance({ heatPerShotKj: 100, shotsPerHour: 60, coolingKw: -1 })).toThrow(
			RangeError
		);
	});
});

describe('ALLOY_PROPERTY_DEFAULTS (REFERENCES.md "Alloys and die life")', () => {
	test('A380 per NADCA A-3-2: 2.71 g/cm³, 540–595 °C, 963 J/(kg·K), L ≈ 389 J/g', () => {
		expect(ALLOY_PROPERTY_DEFAULTS.A380).toMatchObject({
			family: 'aluminium',
			densityKgM3: 2710,
			solidusC: 540,
			liquidusC: 595,
			cpSolid: 963,
			latentHeatJPerKg: 389_000
		});
	});

	test('Zamak 3 per EN 12844 ZP0400: 6.7 g/cm³, 381–387 °C, 419 J/(kg·K), cast 415–435 °C', () => {
		const z = ALLOY_PROPERTY_DEFAULTS.ZP0400;
		expect(z).toMatchObject({ family: 'zinc', densityKgM3: 6700, solidusC: 381, liquidusC: 387 });
		expect(z.cpSolid).toBe(419);
		expect(z.pourC).toBeGreaterThanOrEqual(415);
		expect(z.pourC).toBeLessThanOrEqual(435);
	});

	test('AZ91D per supplier tables: 1.82 g/cm³, 470–595 °C, 1050 J/(kg·K), L ≈ 350 J/g', () => {
		expect(ALLOY_PROPERTY_DEFAULTS.AZ91D).toMatchObject({
			family: 'magnesium',
			densityKgM3: 1820,
			solidusC: 470,
			liquidusC: 595,
			cpSolid: 1050,
			latentHeatJPerKg: 350_000
		});
	});

	test('every alloy is self-consistent and names a source', () => {
		for (const alloy of Object.values(ALLOY_PROPERTY_DEFAULTS)) {
			expect(alloy.source.length).toBeGreaterThan(10);
			expect(alloy.solidusC).toBeLessThanOrEqual(alloy.liquidusC);
			expect(alloy.pourC).toBeGreaterThan(alloy.liquidusC);
		}
		// "Aluminium and magnesium are poured from about 600 °C upward; copper alloys hotter."
		expect(ALLOY_PROPERTY_DEFAULTS.A380.pourC).toBeGreaterThanOrEqual(600);
		expect(ALLOY_PROPERTY_DEFAULTS.AZ91D.pourC).toBeGreaterThanOrEqual(600);
		expect(ALLOY_PROPERTY_DEFAULTS.CuZn39Pb1Al.pourC).toBeGreaterThan(
			ALLOY_PROPERTY_DEFAULTS.A380.pourC
		);
		expect(ALLOY_PROPERTY_DEFAULTS.CuZn39Pb1Al.source).toMatch(/memory/);
	});
});
