import { waterProperties } from './water';

/** Below this Reynolds number pipe flow is laminar (standard fluid-mechanics texts). */
export const LAMINAR_RE_LIMIT = 2300;
/** From this Reynolds number die-cooling practice treats flow as turbulent (*common practice*). */
export const TURBULENT_RE_THRESHOLD = 4000;
/** The Dittus–Boelter heat-transfer correlation holds from Re ≈ 10 000 (standard texts). */
export const DITTUS_BOELTER_MIN_RE = 10_000;
/** A circuit below this share of its nominal flow is flagged as weak (*common practice*), %. */
export const WEAK_FLOW_THRESHOLD_PCT = 80;

export type FlowRegime = 'laminar' | 'transitional' | 'turbulent';

function checkPositive(value: number, what: string): void {
	if (!(value > 0) || !Number.isFinite(value)) throw new RangeError(`${what} must be more than 0.`);
}

/** Mean flow velocity v = V̇ / (π d²/4), m/s, from flow in L/min and bore diameter in mm. */
export function flowVelocity({
	flowLpm,
	diameterMm
}: {
	flowLpm: number;
	diameterMm: number;
}): number {
	if (!(flowLpm >= 0) || !Number.isFinite(flowLpm)) throw new RangeError('Flow must be 0 or more.');
	checkPositive(diameterMm, 'Bore diameter');
	const volumeFlow = flowLpm / 60_000; // m³/s
	const d = diameterMm / 1000;
	return volumeFlow / ((Math.PI * d * d) / 4);
}

/**
 * Reynolds number Re = ρ v d / μ for any liquid with given density (kg/m³) and dynamic viscosity
 * (Pa·s) — e.g. thermal oil from its data sheet. Flow in L/min, bore in mm.
 */
export function reynoldsNumberFor(input: {
	flowLpm: number;
	diameterMm: number;
	density: number;
	viscosity: number;
}): number {
	checkPositive(input.density, 'Density');
	checkPositive(input.viscosity, 'Viscosity');
	const v = flowVelocity(input);
	return (input.density * v * (input.diameterMm / 1000)) / input.viscosity;
}

/**
 * Reynolds number for water at `tempC` (°C), with IAPWS properties from water.ts; flow in L/min,
 * bore in mm.
 */
export function reynoldsNumber(input: {
	flowLpm: number;
	diameterMm: number;
	tempC: number;
}): number {
	const { density, viscosity } = waterProperties(input.tempC);
	return reynoldsNumberFor({ ...input, density, viscosity });
}

/**
 * Flow regime from the Reynolds number: laminar below 2300, turbulent from 4000 (die-cooling
 * practice, *common practice*), transitional between. Note that Dittus–Boelter heat-transfer
 * estimates need Re ≥ 10 000.
 */
export function flowRegime(re: number): FlowRegime {
	if (!(re >= 0)) throw new RangeError('Reynolds number must be 0 or more.');
	if (re < LAMINAR_RE_LIMIT) return 'laminar';
	if (re < TURBULENT_RE_THRESHOLD) return 'transitional';
	return 'turbulent';
}

/**
 * Heat carried away by a coolant, kW: Q = ρ · V̇ · c_p · ΔT, with flow in L/min, temperatures in
 * °C, density in kg/m³ and specific heat in J/(kg·K). Negative when the outlet is colder.
 */
export function heatRemovedKwFor(input: {
	flowLpm: number;
	inletC: number;
	outletC: number;
	density: number;
	specificHeat: number;
}): number {
	if (!(input.flowLpm >= 0) || !Number.isFinite(input.flowLpm)) {
		throw new RangeError('Flow must be 0 or more.');
	}
	checkPositive(input.density, 'Density');
	checkPositive(input.specificHeat, 'Specific heat');
	if (!Number.isFinite(input.inletC) || !Number.isFinite(input.outletC)) {
		throw new RangeError('Inlet and outlet temperatures must be numbers.');
	}
	const volumeFlow = input.flowLpm / 60_000; // m³/s
	return (input.density * volumeFlow * input.specificHeat * (input.outletC - input.inletC)) / 1000;
}

/**
 * Heat carried away by cooling water, kW: Q = ρ · V̇ · c_p · ΔT with IAPWS properties at the mean
 * of inlet and outlet temperature (°C); flow in L/min.
 */
export function heatRemovedKw(input: { flowLpm: number; inletC: number; outletC: number }): number {
	const { density, specificHeat } = waterProperties((input.inletC + input.outletC) / 2);
	return heatRemovedKwFor({ ...input, density, specificHeat });
}

/** Measured flow as a percentage of the circuit's nominal flow (any one flow unit for both). */
export function flowPercentOfNominal(measured: number, nominal: number): number {
	checkPositive(nominal, 'Nominal flow');
	if (!(measured >= 0) || !Number.isFinite(measured)) {
		throw new RangeError('Measured flow must be 0 or more.');
	}
	return (measured / nominal) * 100;
}

/** True when measured flow is below WEAK_FLOW_THRESHOLD_PCT (80 %) of nominal — a blockage flag. */
export function isWeakFlow(measured: number, nominal: number): boolean {
	return flowPercentOfNominal(measured, nominal) < WEAK_FLOW_THRESHOLD_PCT;
}
