import { describe, expect, test } from 'vitest';
import { ALLOY_PROPERTY_DEFAULTS, dieHeatBalance, heatPerShotKj } from './heat-balance';

describe('heatPerShotKj — sensible + latent heat, A380 figures from NADCA tables A-3-2', () => {
	// A380 per NADCA A-3-2: c = 963 J/(kg·K), melting range 540–595 °C; L ≈ 389 J/g (data sheet).
	// Hand example: 2 kg poured at 680 °C, ejected at 300 °C:
	// 963·(680 − 595) + 389 000 + 963·(540 − 300) = 81 855 + 389 000 + 231 120 = 701 975 J/kg,
	// × 2 kg = 1 403 950 J = 1403.95 kJ.
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

	test('2 kg of A380, 680 → 300 °C → 1403.95 kJ', () => {
		expect(heatPerShotKj(a380)).toBeCloseTo(1403.95, 9);
	});

	test('the A380 defaults reproduce the hand example', () => {
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
		).toBeCloseTo(1403.95, 9);
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
