// Display conversions between SI (used inside Castellan) and US customary units. All factors are
// exact unit definitions (NIST SP 811 appendix B).
import { knToUsTon } from './clamp';

export type UnitSystem = 'metric' | 'us';

const MM_PER_IN = 25.4;
const L_PER_US_GAL = 3.785411784;
const KG_PER_LB = 0.45359237;
const CM2_PER_IN2 = (MM_PER_IN * MM_PER_IN) / 100; // 6.4516
/** 1 psi = 1 lbf/in² = 0.45359237 kg × 9.80665 m/s² / (0.0254 m)² = 6894.757… Pa. */
const PA_PER_PSI = (KG_PER_LB * 9.80665) / (0.0254 * 0.0254);

/** Millimetres → inches (1 in = 25.4 mm). */
export const mmToIn = (mm: number): number => mm / MM_PER_IN;
/** Inches → millimetres (1 in = 25.4 mm). */
export const inToMm = (inches: number): number => inches * MM_PER_IN;
/** Litres per minute → US gallons per minute (1 US gal = 3.785411784 L). */
export const lpmToUsGpm = (lpm: number): number => lpm / L_PER_US_GAL;
/** US gallons per minute → litres per minute (1 US gal = 3.785411784 L). */
export const usGpmToLpm = (gpm: number): number => gpm * L_PER_US_GAL;
/** Degrees Celsius → degrees Fahrenheit (a temperature, not a difference). */
export const cToF = (c: number): number => (c * 9) / 5 + 32;
/** Degrees Fahrenheit → degrees Celsius (a temperature, not a difference). */
export const fToC = (f: number): number => ((f - 32) * 5) / 9;
/** A temperature difference in kelvin (°C) → in °F. */
export const deltaCToDeltaF = (dc: number): number => (dc * 9) / 5;
/** A temperature difference in °F → in kelvin (°C). */
export const deltaFToDeltaC = (df: number): number => (df * 5) / 9;
/** Kilograms → pounds (1 lb = 0.45359237 kg). */
export const kgToLb = (kg: number): number => kg / KG_PER_LB;
/** Pounds → kilograms (1 lb = 0.45359237 kg). */
export const lbToKg = (lb: number): number => lb * KG_PER_LB;
/** Square centimetres → square inches (1 in² = 6.4516 cm²). */
export const cm2ToIn2 = (cm2: number): number => cm2 / CM2_PER_IN2;
/** Square inches → square centimetres (1 in² = 6.4516 cm²). */
export const in2ToCm2 = (in2: number): number => in2 * CM2_PER_IN2;
/** Bar → psi (1 bar = 100 000 Pa; 1 psi ≈ 6894.757 Pa). */
export const barToPsi = (bar: number): number => (bar * 1e5) / PA_PER_PSI;
/** psi → bar (1 bar = 100 000 Pa; 1 psi ≈ 6894.757 Pa). */
export const psiToBar = (psi: number): number => (psi * PA_PER_PSI) / 1e5;

// Building an Intl.NumberFormat costs far more than using one; the board formats thousands.
const NUMBER_FORMATS = new Map<number, Intl.NumberFormat>();

function formatNumber(value: number, fractionDigits: number): string {
	let f = NUMBER_FORMATS.get(fractionDigits);
	if (!f) {
		f = new Intl.NumberFormat('en-US', {
			minimumFractionDigits: fractionDigits,
			maximumFractionDigits: fractionDigits
		});
		NUMBER_FORMATS.set(fractionDigits, f);
	}
	return f.format(value);
}

/** Force for display: kN in metric, US short tons-force in US customary. */
export function formatForce(kn: number, system: UnitSystem, fractionDigits = 0): string {
	return system === 'metric'
		? `${formatNumber(kn, fractionDigits)} kN`
		: `${formatNumber(knToUsTon(kn), fractionDigits)} US tons`;
}

/** Length for display: mm or inches. */
export function formatLength(mm: number, system: UnitSystem, fractionDigits = 1): string {
	return system === 'metric'
		? `${formatNumber(mm, fractionDigits)} mm`
		: `${formatNumber(mmToIn(mm), fractionDigits + 2)} in`;
}

/** Flow for display: L/min or US gal/min. */
export function formatFlow(lpm: number, system: UnitSystem, fractionDigits = 1): string {
	return system === 'metric'
		? `${formatNumber(lpm, fractionDigits)} L/min`
		: `${formatNumber(lpmToUsGpm(lpm), fractionDigits)} gal/min`;
}

/** Temperature for display: °C or °F. */
export function formatTemperature(c: number, system: UnitSystem, fractionDigits = 0): string {
	return system === 'metric'
		? `${formatNumber(c, fractionDigits)} °C`
		: `${formatNumber(cToF(c), fractionDigits)} °F`;
}

/** Mass for display: kg or lb. */
export function formatMass(kg: number, system: UnitSystem, fractionDigits = 2): string {
	return system === 'metric'
		? `${formatNumber(kg, fractionDigits)} kg`
		: `${formatNumber(kgToLb(kg), fractionDigits)} lb`;
}

/** Area for display: cm² or in². */
export function formatArea(cm2: number, system: UnitSystem, fractionDigits = 0): string {
	return system === 'metric'
		? `${formatNumber(cm2, fractionDigits)} cm²`
		: `${formatNumber(cm2ToIn2(cm2), fractionDigits)} in²`;
}

/** Pressure for display: bar or psi. */
export function formatPressure(bar: number, system: UnitSystem, fractionDigits = 0): string {
	return system === 'metric'
		? `${formatNumber(bar, fractionDigits)} bar`
		: `${formatNumber(barToPsi(bar), fractionDigits)} psi`;
}
