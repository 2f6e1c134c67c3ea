import type { AlloyFamily } from './life';

/** Standard gravity, m/s²; 1 tonne-force = 1000 kg × g_n = 9.80665 kN (unit definition). */
const KN_PER_TONNE_FORCE = 9.80665;
/** 1 US short ton-force = 2000 lbf = 2000 × 0.45359237 kg × g_n = 8.896443230521 kN. */
const KN_PER_US_TON = (2000 * 0.45359237 * 9.80665) / 1000;

/** Locking-force safety factors — Giesserei-Lexikon, "die opening force". */
export const CLAMP_SAFETY_FACTOR = { withSlides: 1.25, withoutSlides: 1.1 } as const;

export interface DieOpeningInput {
	/** Projected area of cavities, runners and overflows, cm². */
	projectedAreaCm2: number;
	/** Metal pressure in the cavity, bar. */
	metalPressureBar: number;
}

function checkAreaAndPressure({ projectedAreaCm2, metalPressureBar }: DieOpeningInput): void {
	if (!(projectedAreaCm2 > 0) || !Number.isFinite(projectedAreaCm2)) {
		throw new RangeError('Projected area must be more than 0 cm².');
	}
	if (!(metalPressureBar > 0) || !Number.isFinite(metalPressureBar)) {
		throw new RangeError('Metal pressure must be more than 0 bar.');
	}
}

/**
 * Die opening force F_s [kN] = A [cm²] · p [bar] / 100 — Giesserei-Lexikon, "die opening force".
 */
export function dieOpeningForceKn(input: DieOpeningInput): number {
	checkAreaAndPressure(input);
	return (input.projectedAreaCm2 * input.metalPressureBar) / 100;
}

/**
 * Required locking (clamping) force F_z [kN] = k · F_s with k = 1.25 for dies with slides and
 * 1.1 without — Giesserei-Lexikon, "die opening force".
 */
export function requiredClampForceKn(input: DieOpeningInput & { hasSlides: boolean }): number {
	const factor = input.hasSlides
		? CLAMP_SAFETY_FACTOR.withSlides
		: CLAMP_SAFETY_FACTOR.withoutSlides;
	return factor * dieOpeningForceKn(input);
}

/** kN → tonne-force (1 tf = 9.80665 kN). */
export function knToTonneForce(kn: number): number {
	return kn / KN_PER_TONNE_FORCE;
}

/** tonne-force → kN (1 tf = 9.80665 kN). */
export function tonneForceToKn(tf: number): number {
	return tf * KN_PER_TONNE_FORCE;
}

/** kN → US short ton-force (1 US ton-force = 2000 lbf = 8.896443 kN). */
export function knToUsTon(kn: number): number {
	return kn / KN_PER_US_TON;
}

/** US short ton-force → kN (1 US ton-force = 2000 lbf = 8.896443 kN). */
export function usTonToKn(usTon: number): number {
	return usTon * KN_PER_US_TON;
}

export type DieCastingProcess = 'hot_chamber' | 'cold_chamber';

/**
 * Starting values for the metal pressure, bar (*common practice*, ../shared/REFERENCES.md process
 * facts: hot chamber around 15 MPa on average; cold chamber 20–70 MPa, up to about 150 MPa).
 * The cold-chamber split by family is plant practice, not a published figure; zinc rarely runs
 * cold chamber. Editable per die.
 */
export const DEFAULT_METAL_PRESSURE_BAR: {
	readonly hot_chamber: number;
	readonly cold_chamber: Readonly<Record<AlloyFamily, number>>;
} = {
	hot_chamber: 150,
	cold_chamber: { aluminium: 600, magnesium: 500, copper: 400, zinc: 300 }
};

/** Default metal pressure, bar, for a process and alloy family (see DEFAULT_METAL_PRESSURE_BAR). */
export function defaultMetalPressureBar(process: DieCastingProcess, family: AlloyFamily): number {
	return process === 'hot_chamber'
		? DEFAULT_METAL_PRESSURE_BAR.hot_chamber
		: DEFAULT_METAL_PRESSURE_BAR.cold_chamber[family];
}

/** Plausibility bounds on metal pressure, bar (*common practice*, REFERENCES.md process facts). */
export const METAL_PRESSURE_LIMITS_BAR = {
	/** Die casting overall spans roughly 0.7–700 MPa. */
	physicalMin: 7,
	physicalMax: 7000,
	/** Hot chamber: up to about 35 MPa. */
	hotChamberMax: 350,
	/** Cold chamber: 20–70 MPa typical, up to about 150 MPa. */
	coldChamberMin: 200,
	coldChamberMax: 1500
} as const;

export interface PressureCheck {
	level: 'ok' | 'warn' | 'reject';
	message: string;
}

/**
 * Plausibility of an entered metal pressure, bar: reject outside 7–7000 bar (0.7–700 MPa); warn
 * above 350 bar for hot chamber, outside 200–1500 bar for cold chamber (*common practice*,
 * REFERENCES.md process facts). A plausibility bound on input, not a result.
 */
export function checkMetalPressure(process: DieCastingProcess, bar: number): PressureCheck {
	const L = METAL_PRESSURE_LIMITS_BAR;
	if (!Number.isFinite(bar) || bar < L.physicalMin || bar > L.physicalMax) {
		return {
			level: 'reject',
			message: `Metal pressure must be between ${L.physicalMin} and ${L.physicalMax} bar (0.7–700 MPa); check the value and its unit.`
		};
	}
	if (process === 'hot_chamber' && bar > L.hotChamberMax) {
		return {
			level: 'warn',
			message: `${bar} bar is high for a hot-chamber machine, which usually works up to about ${L.hotChamberMax} bar. Is this a cold-chamber die?`
		};
	}
	if (process === 'cold_chamber' && (bar < L.coldChamberMin || bar > L.coldChamberMax)) {
		return {
			level: 'warn',
			message: `${bar} bar is unusual for a cold-chamber machine, which usually works between ${L.coldChamberMin} and ${L.coldChamberMax} bar.`
		};
	}
	return { level: 'ok', message: 'Metal pressure is within the usual range for this process.' };
}

/** The metal pressure a clamping check uses, bar: the die's own figure, else the family default. */
export function effectiveMetalPressureBar(
	own: number | null,
	process: DieCastingProcess,
	family: AlloyFamily
): number {
	return own ?? defaultMetalPressureBar(process, family);
}
