import type { AlloyFamily } from './life';

export interface HeatPerShotInput {
	/** Metal per shot (parts, runners, overflows, biscuit), kg. */
	shotMassKg: number;
	/** Pouring temperature, °C. */
	pourC: number;
	/** Liquidus temperature, °C. */
	liquidusC: number;
	/** Solidus temperature, °C. */
	solidusC: number;
	/** Temperature of the casting at ejection, °C. */
	ejectC: number;
	/** Specific heat of the liquid, J/(kg·K). */
	cpLiquid: number;
	/** Specific heat of the solid, J/(kg·K). */
	cpSolid: number;
	/** Latent heat of fusion, J/kg. */
	latentHeatJPerKg: number;
}

/** Mean specific heat over the freezing range, J/(kg·K): the average of liquid and solid. */
export function mushySpecificHeat(cpLiquid: number, cpSolid: number): number {
	return (cpLiquid + cpSolid) / 2;
}

/**
 * Heat one kilogram of metal gives up from pouring to ejection, J/kg:
 * q = c_l·(T_pour − T_liq) + L + c_mushy·(T_liq − T_sol) + c_s·(T_sol − T_eject),
 * with c_mushy the mean of the liquid and solid specific heats. Sensible heat of the liquid, the
 * latent heat, the sensible heat of the freezing range (not part of L) and the sensible heat of
 * the solid — the standard enthalpy balance of a casting (any heat-transfer or foundry text).
 */
export function heatPerKgJ(input: Omit<HeatPerShotInput, 'shotMassKg'>): number {
	const { pourC, liquidusC, solidusC, ejectC, cpLiquid, cpSolid, latentHeatJPerKg } = input;
	for (const [value, what] of [
		[cpLiquid, 'Specific heat of the liquid'],
		[cpSolid, 'Specific heat of the solid']
	] as const) {
		if (!(value > 0) || !Number.isFinite(value))
			throw new RangeError(`${what} must be more than 0.`);
	}
	if (!(latentHeatJPerKg >= 0) || !Number.isFinite(latentHeatJPerKg)) {
		throw new RangeError('Latent heat must be 0 or more.');
	}
	if (![pourC, liquidusC, solidusC, ejectC].every(Number.isFinite)) {
		throw new RangeError('Temperatures must be numbers.');
	}
	if (liquidusC < solidusC) throw new RangeError('The liquidus cannot be below the solidus.');
	if (pourC < liquidusC) {
		throw new RangeError('The pouring temperature must be at or above the liquidus.');
	}
	if (ejectC > solidusC) {
		throw new RangeError('The ejection temperature must be at or below the solidus.');
	}
	return (
		cpLiquid * (pourC - liquidusC) +
		latentHeatJPerKg +
		mushySpecificHeat(cpLiquid, cpSolid) * (liquidusC - solidusC) +
		cpSolid * (solidusC - ejectC)
	);
}

/** Heat the metal gives to the die per shot, kJ: m · heatPerKgJ / 1000. */
export function heatPerShotKj(input: HeatPerShotInput): number {
	if (!(input.shotMassKg > 0) || !Number.isFinite(input.shotMassKg))
		throw new RangeError('Shot mass must be more than 0.');
	return (input.shotMassKg * heatPerKgJ(input)) / 1000;
}

/** Below this ratio of cooling to heat input the cooling is short (*common practice*). */
export const COOLING_SHORT_RATIO = 0.8;
/** Above this ratio the cooling is ample — the die may run cold (plant default). */
export const COOLING_AMPLE_RATIO = 1.2;

export type HeatBalanceVerdict = 'cooling_short' | 'balanced' | 'ample';

export interface HeatBalance {
	/** Heat brought by the metal, kW. */
	heatInKw: number;
	/** Measured cooling capacity, kW. */
	coolingKw: number;
	/** coolingKw / heatInKw. */
	ratio: number;
	verdict: HeatBalanceVerdict;
	message: string;
}

const pct = (ratio: number) => `${Math.round(ratio * 100)} %`;
const kw = (value: number) => `${value.toFixed(1)} kW`;

/**
 * Die heat balance: heat in (kW) = heat per shot (kJ) × shots per hour / 3600, against the
 * measured cooling capacity (kW). Short below 80 % of the heat in, ample above 120 %. A planning
 * aid only: part of the heat also leaves through die spray, radiation and the platens.
 */
export function dieHeatBalance(input: {
	heatPerShotKj: number;
	shotsPerHour: number;
	coolingKw: number;
}): HeatBalance {
	const { heatPerShotKj, shotsPerHour, coolingKw } = input;
	if (!(heatPerShotKj > 0) || !Number.isFinite(heatPerShotKj)) {
		throw new RangeError('Heat per shot must be more than 0 kJ.');
	}
	if (!(shotsPerHour > 0) || !Number.isFinite(shotsPerHour)) {
		throw new RangeError('Shots per hour must be more than 0.');
	}
	if (!(coolingKw >= 0) || !Number.isFinite(coolingKw)) {
		throw new RangeError('Cooling capacity must be 0 kW or more.');
	}
	const heatInKw = (heatPerShotKj * shotsPerHour) / 3600;
	const ratio = coolingKw / heatInKw;
	const figures = `Cooling removes ${kw(coolingKw)} of the ${kw(heatInKw)} the metal brings (${pct(ratio)}).`;
	const caveat = 'Planning aid only.';
	let verdict: HeatBalanceVerdict;
	let message: string;
	if (ratio < COOLING_SHORT_RATIO) {
		verdict = 'cooling_short';
		message = `${figures} Expect the die to run hot: some heat leaves through die spray and radiation, but not usually this much. Check the circuits or slow the cycle. ${caveat}`;
	} else if (ratio > COOLING_AMPLE_RATIO) {
		verdict = 'ample';
		message = `${figures} Cooling has capacity to spare; watch for a cold die (cold laps, misruns) and throttle circuits if needed. ${caveat}`;
	} else {
		verdict = 'balanced';
		message = `${figures} Cooling matches the heat input; the rest leaves through die spray and radiation. ${caveat}`;
	}
	return { heatInKw, coolingKw, ratio, verdict, message };
}

export interface AlloyProperties {
	name: string;
	family: AlloyFamily;
	/** kg/m³ */
	densityKgM3: number;
	/** °C */
	liquidusC: number;
	/** °C */
	solidusC: number;
	/** J/(kg·K) */
	cpLiquid: number;
	/** J/(kg·K) */
	cpSolid: number;
	/** J/kg */
	latentHeatJPerKg: number;
	/** Typical pouring temperature, °C. */
	pourC: number;
	/** Where the figures come from. */
	source: string;
}

export type AlloyKey = 'A380' | 'ZP0400' | 'AZ91D' | 'CuZn39Pb1Al';

/**
 * Starting property values for common die-casting alloys (see ../shared/REFERENCES.md "Alloys and
 * die life"). The alloy tables publish the solid's specific heat; the liquid's is taken from the
 * base metal's liquid heat capacity in the NIST-JANAF Thermochemical Tables, read from memory
 * (Al 31.75, Mg 34.3, Zn 31.4, Cu 32.8 J/(mol·K)) — from memory, check against the data sheet.
 * Editable per alloy.
 */
export const ALLOY_PROPERTY_DEFAULTS: Readonly<Record<AlloyKey, AlloyProperties>> = {
	A380: {
		name: 'A380',
		family: 'aluminium',
		densityKgM3: 2710,
		liquidusC: 595,
		solidusC: 540,
		// 31.75 J/(mol·K) ÷ 0.0269815 kg/mol = 1 177 J/(kg·K) (liquid Al, NIST-JANAF, from memory).
		cpLiquid: 1177,
		cpSolid: 963,
		latentHeatJPerKg: 389_000,
		pourC: 680,
		source:
			'NADCA product specification tables A-3-2 (density, melting range, solid specific heat); latent heat from an alloy data sheet copy (medium confidence); liquid specific heat of pure aluminium, NIST-JANAF (from memory); pour temperature common practice.'
	},
	ZP0400: {
		name: 'Zamak 3 (ZP0400)',
		family: 'zinc',
		densityKgM3: 6700,
		liquidusC: 387,
		solidusC: 381,
		// 31.4 J/(mol·K) ÷ 0.06538 kg/mol = 480 J/(kg·K) (liquid Zn, NIST-JANAF, from memory).
		cpLiquid: 480,
		cpSolid: 419,
		latentHeatJPerKg: 110_000,
		pourC: 425,
		source:
			'EN 12844 zinc alloy table (density, melting range, casting range 415–435 °C, solid specific heat); latent heat from memory (close to pure zinc, about 110 J/g); liquid specific heat of pure zinc, NIST-JANAF (from memory).'
	},
	AZ91D: {
		name: 'AZ91D',
		family: 'magnesium',
		densityKgM3: 1820,
		liquidusC: 595,
		solidusC: 470,
		// 34.3 J/(mol·K) ÷ 0.024305 kg/mol = 1 411 J/(kg·K) (liquid Mg, NIST-JANAF, from memory).
		cpLiquid: 1411,
		cpSolid: 1050,
		latentHeatJPerKg: 350_000,
		pourC: 660,
		source:
			'Supplier typical-property tables (density, melting range, solid specific heat, latent heat; medium confidence); liquid specific heat of pure magnesium, NIST-JANAF (from memory); pour temperature common practice.'
	},
	CuZn39Pb1Al: {
		name: 'Brass CuZn39Pb1Al-C',
		family: 'copper',
		densityKgM3: 8500,
		liquidusC: 900,
		solidusC: 880,
		// 32.8 J/(mol·K) ÷ 0.063546 kg/mol = 516 J/(kg·K) (liquid Cu, NIST-JANAF, from memory).
		cpLiquid: 516,
		cpSolid: 380,
		latentHeatJPerKg: 170_000,
		pourC: 980,
		source:
			'From memory (typical die-casting brass figures; no source read here) — check against the supplier data sheet.'
	}
};
