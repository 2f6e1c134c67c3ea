// Properties of liquid water for cooling-circuit calculations, from the IAPWS formulations.

/** Specific gas constant of water for IAPWS-IF97, kJ/(kg·K). */
const IF97_R = 0.461526;
/** Critical temperature, K, and density, kg/m³ (IAPWS). */
const CRITICAL_T = 647.096;
const CRITICAL_RHO = 322;

// IAPWS R12-08 eq. (11): ideal-gas-limit coefficients H_i.
const VISCOSITY_H0 = [1.67752, 2.20462, 0.6366564, -0.241605];
// IAPWS R12-08 eq. (12), Table 2: H_ij as [i, j, H_ij].
const VISCOSITY_H1: readonly (readonly [number, number, number])[] = [
	[0, 0, 5.20094e-1],
	[1, 0, 8.50895e-2],
	[2, 0, -1.08374],
	[3, 0, -2.89555e-1],
	[0, 1, 2.22531e-1],
	[1, 1, 9.99115e-1],
	[2, 1, 1.88797],
	[3, 1, 1.26613],
	[5, 1, 1.20573e-1],
	[0, 2, -2.81378e-1],
	[1, 2, -9.06851e-1],
	[2, 2, -7.72479e-1],
	[3, 2, -4.89837e-1],
	[4, 2, -2.5704e-1],
	[0, 3, 1.61913e-1],
	[1, 3, 2.57399e-1],
	[0, 4, -3.25372e-2],
	[3, 4, 6.98452e-2],
	[4, 5, 8.72102e-3],
	[3, 6, -4.35673e-3],
	[5, 6, -5.93264e-4]
];

/**
 * Dynamic viscosity of water, Pa·s, from temperature (K) and density (kg/m³) — IAPWS R12-08
 * (2008 formulation for the viscosity of ordinary water), μ = μ* · μ0 · μ1 with μ* = 1 µPa·s.
 * The critical enhancement μ2 is taken as 1, which is exact away from the critical point.
 */
export function iapwsViscosity(temperatureK: number, densityKgM3: number): number {
	if (!(temperatureK > 0) || !(densityKgM3 > 0)) {
		throw new RangeError('Temperature and density must be positive.');
	}
	const tr = temperatureK / CRITICAL_T;
	const dr = densityKgM3 / CRITICAL_RHO;
	let denominator = 0;
	for (let i = 0; i < VISCOSITY_H0.length; i++) denominator += VISCOSITY_H0[i] / Math.pow(tr, i);
	const mu0 = (100 * Math.sqrt(tr)) / denominator;
	let sum = 0;
	for (const [i, j, h] of VISCOSITY_H1) sum += h * Math.pow(1 / tr - 1, i) * Math.pow(dr - 1, j);
	const mu1 = Math.exp(dr * sum);
	return mu0 * mu1 * 1e-6;
}

// IAPWS-IF97 region 1, Table 2: coefficients as [I, J, n].
const REGION1: readonly (readonly [number, number, number])[] = [
	[0, -2, 0.14632971213167],
	[0, -1, -0.84548187169114],
	[0, 0, -0.3756360367204e1],
	[0, 1, 0.33855169168385e1],
	[0, 2, -0.95791963387872],
	[0, 3, 0.15772038513228],
	[0, 4, -0.16616417199501e-1],
	[0, 5, 0.81214629983568e-3],
	[1, -9, 0.28319080123804e-3],
	[1, -7, -0.60706301565874e-3],
	[1, -1, -0.18990068218419e-1],
	[1, 0, -0.32529748770505e-1],
	[1, 1, -0.21841717175414e-1],
	[1, 3, -0.5283835796993e-4],
	[2, -3, -0.47184321073267e-3],
	[2, 0, -0.30001780793026e-3],
	[2, 1, 0.47661393906987e-4],
	[2, 3, -0.44141845330846e-5],
	[2, 17, -0.72694996297594e-15],
	[3, -4, -0.31679644845054e-4],
	[3, 0, -0.28270797985312e-5],
	[3, 6, -0.85205128120103e-9],
	[4, -5, -0.22425281908e-5],
	[4, -2, -0.65171222895601e-6],
	[4, 10, -0.14341729937924e-12],
	[5, -8, -0.40516996860117e-6],
	[8, -11, -0.12734301741641e-8],
	[8, -6, -0.17424871230634e-9],
	[21, -29, -0.68762131295531e-18],
	[23, -31, 0.14478307828521e-19],
	[29, -38, 0.26335781662795e-22],
	[30, -39, -0.11947622640071e-22],
	[31, -40, 0.18228094581404e-23],
	[32, -41, -0.93537087292458e-25]
];

// IAPWS-IF97 region 4, eq. (30): saturation-pressure coefficients n1…n10.
const REGION4 = [
	0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.1202082470247e5,
	-0.32325550322333e7, 0.1491510861353e2, -0.48232657361591e4, 0.40511340542057e6,
	-0.23855557567849, 0.65017534844798e3
];

/** Region 1 (liquid) bounds of IAPWS-IF97, K and MPa. */
export const IF97_REGION1_LIMITS = { minK: 273.15, maxK: 623.15, maxMPa: 100 } as const;

/**
 * Saturation pressure of water, MPa, at temperature 273.15–647.096 K — IAPWS-IF97 region 4,
 * eq. (30).
 */
export function iapwsIf97SaturationPressure(temperatureK: number): number {
	if (!(temperatureK >= 273.15 && temperatureK <= CRITICAL_T)) {
		throw new RangeError('Saturation pressure is defined from 273.15 K to 647.096 K.');
	}
	const n = REGION4;
	const theta = temperatureK + n[8] / (temperatureK - n[9]);
	const a = theta * theta + n[0] * theta + n[1];
	const b = n[2] * theta * theta + n[3] * theta + n[4];
	const c = n[5] * theta * theta + n[6] * theta + n[7];
	return Math.pow((2 * c) / (-b + Math.sqrt(b * b - 4 * a * c)), 4);
}

export interface If97Region1Properties {
	/** m³/kg */
	specificVolume: number;
	/** kg/m³ */
	density: number;
	/** kJ/kg */
	specificEnthalpy: number;
	/** kJ/kg */
	specificInternalEnergy: number;
	/** kJ/(kg·K) */
	specificEntropy: number;
	/** Isobaric heat capacity, kJ/(kg·K) — IF97 units, not J. */
	specificHeatCp: number;
	/** Isochoric heat capacity, kJ/(kg·K). */
	specificHeatCv: number;
	/** m/s */
	speedOfSound: number;
}

/**
 * Properties of liquid water from the IAPWS-IF97 region 1 Gibbs free-energy equation
 * (eq. 7, Table 2 coefficients, Table 3 relations); T in K, p in MPa, energies in kJ
 * as in the release. Valid 273.15–623.15 K, from the saturation pressure up to 100 MPa.
 */
export function iapwsIf97Region1(temperatureK: number, pressureMPa: number): If97Region1Properties {
	const L = IF97_REGION1_LIMITS;
	if (!(temperatureK >= L.minK && temperatureK <= L.maxK)) {
		throw new RangeError(`IF97 region 1 covers ${L.minK}–${L.maxK} K; got ${temperatureK} K.`);
	}
	if (!(pressureMPa > 0 && pressureMPa <= L.maxMPa)) {
		throw new RangeError(
			`IF97 region 1 covers pressures up to ${L.maxMPa} MPa; got ${pressureMPa}.`
		);
	}
	// A few ppm of slack so the saturated-liquid point itself is accepted.
	if (pressureMPa < iapwsIf97SaturationPressure(temperatureK) * (1 - 1e-9)) {
		throw new RangeError(
			`At ${temperatureK} K and ${pressureMPa} MPa water is steam, not liquid (IF97 region 1).`
		);
	}
	const pi = pressureMPa / 16.53;
	const tau = 1386 / temperatureK;
	const a = 7.1 - pi;
	const b = tau - 1.222;
	let g = 0;
	let gPi = 0;
	let gPiPi = 0;
	let gTau = 0;
	let gTauTau = 0;
	let gPiTau = 0;
	for (const [i, j, n] of REGION1) {
		const ai = Math.pow(a, i);
		const bj = Math.pow(b, j);
		g += n * ai * bj;
		if (i > 0) {
			const ai1 = Math.pow(a, i - 1);
			gPi -= n * i * ai1 * bj;
			if (j !== 0) gPiTau -= n * i * ai1 * j * Math.pow(b, j - 1);
			if (i > 1) gPiPi += n * i * (i - 1) * Math.pow(a, i - 2) * bj;
		}
		if (j !== 0) {
			gTau += n * ai * j * Math.pow(b, j - 1);
			if (j !== 1) gTauTau += n * ai * j * (j - 1) * Math.pow(b, j - 2);
		}
	}
	const rt = IF97_R * temperatureK; // kJ/kg
	// v = π γ_π R T / p, with R T in kJ/kg = kPa·m³/kg and p in kPa.
	const specificVolume = (pi * gPi * rt) / (pressureMPa * 1000);
	const specificEnthalpy = tau * gTau * rt;
	const specificInternalEnergy = rt * (tau * gTau - pi * gPi);
	const specificEntropy = IF97_R * (tau * gTau - g);
	const specificHeatCp = -IF97_R * tau * tau * gTauTau;
	const cross = gPi - tau * gPiTau;
	const specificHeatCv = IF97_R * (-tau * tau * gTauTau + (cross * cross) / gPiPi);
	const speedOfSound = Math.sqrt(
		(rt * 1000 * gPi * gPi) / ((cross * cross) / (tau * tau * gTauTau) - gPiPi)
	);
	return {
		specificVolume,
		density: 1 / specificVolume,
		specificEnthalpy,
		specificInternalEnergy,
		specificEntropy,
		specificHeatCp,
		specificHeatCv,
		speedOfSound
	};
}

/** Temperature range waterProperties accepts, °C (Castellan uses 1–150 °C). */
export const WATER_TEMPERATURE_RANGE_C = { min: 0.01, max: 200 } as const;

export interface WaterProperties {
	/** kg/m³ */
	density: number;
	/** Dynamic viscosity, Pa·s */
	viscosity: number;
	/** Isobaric specific heat, J/(kg·K) */
	specificHeat: number;
}

/**
 * Liquid water at `tempC` (°C) and `pressureMPa` (default 1 atm): density and specific heat from
 * IAPWS-IF97 region 1, viscosity from IAPWS R12-08. Circuits above 100 °C run pressurised; when
 * the given pressure is below the saturation pressure the water is taken as saturated liquid
 * (liquid properties hardly depend on pressure). Throws RangeError outside 0.01–200 °C.
 */
export function waterProperties(tempC: number, pressureMPa = 0.101325): WaterProperties {
	const R = WATER_TEMPERATURE_RANGE_C;
	if (!(tempC >= R.min && tempC <= R.max)) {
		throw new RangeError(
			`Water temperature must be between ${R.min} and ${R.max} °C; got ${tempC}.`
		);
	}
	const temperatureK = tempC + 273.15;
	const pressure = Math.max(pressureMPa, iapwsIf97SaturationPressure(temperatureK));
	const props = iapwsIf97Region1(temperatureK, pressure);
	return {
		density: props.density,
		viscosity: iapwsViscosity(temperatureK, props.density),
		specificHeat: props.specificHeatCp * 1000
	};
}
