// Two-parameter Weibull distribution: fleet life statistics from retired dies (failures) and
// running dies (right-censored suspensions).

export interface WeibullFit {
	/** Shape β (dimensionless). */
	shape: number;
	/** Scale η, in the unit of the data (shots). */
	scale: number;
	/** Log-likelihood at the estimate: Σ ln f(failures) + Σ ln S(suspensions). */
	logLikelihood: number;
}

function checkParameters(shape: number, scale: number): void {
	if (!(shape > 0) || !Number.isFinite(shape)) throw new RangeError('Weibull shape must be > 0.');
	if (!(scale > 0) || !Number.isFinite(scale)) throw new RangeError('Weibull scale must be > 0.');
}

/**
 * Maximum-likelihood Weibull fit with right-censoring. Solves the profile-likelihood equation
 * Σ tᵢ^β ln tᵢ / Σ tᵢ^β − 1/β − (1/r) Σ_failures ln tᵢ = 0 for the shape β (Newton steps kept
 * inside a bisection bracket; the left side rises monotonically in β), then the scale in closed
 * form η = (Σ tᵢ^β / r)^(1/β), sums over all units, r = number of failures.
 * Source: NIST/SEMATECH e-Handbook of Statistical Methods §8.4.1.3 (and §8.4.1.2 for the
 * likelihood with censoring). Ages in any positive unit (shots).
 *
 * Suspensions at age 0 (dies that have not run) add nothing to the likelihood and are skipped.
 */
export function fitWeibull(
	failures: readonly number[],
	suspensions: readonly number[] = []
): WeibullFit {
	if (failures.length < 2) {
		throw new Error('A Weibull fit needs at least 2 failures (retired dies).');
	}
	for (const t of failures) {
		if (!(t > 0) || !Number.isFinite(t)) {
			throw new Error(`Failure ages must be positive numbers; got ${t}.`);
		}
	}
	for (const t of suspensions) {
		if (!(t >= 0) || !Number.isFinite(t)) {
			throw new Error(`Suspension ages must be zero or positive numbers; got ${t}.`);
		}
	}
	const all = [...failures, ...suspensions.filter((t) => t > 0)];
	const r = failures.length;
	// Work on ages divided by the largest one so t^β cannot overflow for large β.
	const unit = Math.max(...all);
	const logs = all.map((t) => Math.log(t / unit)); // all ≤ 0
	const meanFailureLog = failures.reduce((s, t) => s + Math.log(t / unit), 0) / r;
	// As β → ∞ the first term tends to max ln t = 0; no finite root unless that exceeds the mean
	// failure log, i.e. unless some unit outlived the earliest-looking failures.
	if (meanFailureLog > -1e-12) {
		throw new Error(
			'All failures happened at the same age with no unit lasting longer; the Weibull shape cannot be estimated.'
		);
	}

	const sums = (beta: number) => {
		let s0 = 0;
		let s1 = 0;
		let s2 = 0;
		for (const l of logs) {
			const w = Math.exp(beta * l);
			s0 += w;
			s1 += w * l;
			s2 += w * l * l;
		}
		return { s0, s1, s2 };
	};
	const equation = (beta: number) => {
		const { s0, s1, s2 } = sums(beta);
		const value = s1 / s0 - 1 / beta - meanFailureLog;
		const slope = (s2 * s0 - s1 * s1) / (s0 * s0) + 1 / (beta * beta);
		return { value, slope };
	};

	let lo = 1;
	let hi = 1;
	while (equation(lo).value > 0) {
		lo /= 2;
		if (lo < 1e-8) throw new Error('Weibull fit did not converge (shape too small).');
	}
	while (equation(hi).value < 0) {
		hi *= 2;
		if (hi > 1e6) throw new Error('Weibull fit did not converge (shape too large).');
	}
	let beta = (lo + hi) / 2;
	for (let i = 0; i < 200; i++) {
		const { value, slope } = equation(beta);
		if (value === 0) break;
		if (value > 0) hi = beta;
		else lo = beta;
		let next = beta - value / slope;
		if (!(next > lo && next < hi)) next = (lo + hi) / 2;
		if (Math.abs(next - beta) <= 1e-14 * beta) {
			beta = next;
			break;
		}
		beta = next;
	}

	const { s0 } = sums(beta);
	const scale = unit * Math.pow(s0 / r, 1 / beta);
	let logLikelihood = 0;
	for (const t of failures) {
		logLikelihood +=
			Math.log(beta / scale) + (beta - 1) * Math.log(t / scale) - Math.pow(t / scale, beta);
	}
	for (const t of suspensions) logLikelihood -= Math.pow(t / scale, beta);
	return { shape: beta, scale, logLikelihood };
}

/** Weibull survival S(t) = exp(−(t/η)^β); t in the unit of the scale. Standard definition. */
export function weibullSurvival(t: number, shape: number, scale: number): number {
	checkParameters(shape, scale);
	if (t <= 0) return 1;
	return Math.exp(-Math.pow(t / scale, shape));
}

/** Weibull CDF F(t) = 1 − exp(−(t/η)^β). Standard definition. */
export function weibullCdf(t: number, shape: number, scale: number): number {
	checkParameters(shape, scale);
	if (t <= 0) return 0;
	return -Math.expm1(-Math.pow(t / scale, shape));
}

/**
 * Probability that a unit of age `age` survives `extra` more: S(age + extra) / S(age),
 * computed as exp((age/η)^β − ((age+extra)/η)^β) so old ages do not give 0/0.
 */
export function conditionalSurvival(
	age: number,
	extra: number,
	shape: number,
	scale: number
): number {
	checkParameters(shape, scale);
	if (!(age >= 0) || !(extra >= 0)) throw new RangeError('Age and extra must be zero or more.');
	return Math.exp(Math.pow(age / scale, shape) - Math.pow((age + extra) / scale, shape));
}

/** Weibull quantile t_p = η (−ln(1 − p))^(1/β), 0 ≤ p ≤ 1. The B10 life is p = 0.10. */
export function weibullQuantile(p: number, shape: number, scale: number): number {
	checkParameters(shape, scale);
	if (!(p >= 0 && p <= 1)) throw new RangeError('Probability must be between 0 and 1.');
	return scale * Math.pow(-Math.log1p(-p), 1 / shape);
}

/** B10 life: the age by which 10 % of units have failed (`weibullQuantile(0.1, …)`). */
export function weibullB10(shape: number, scale: number): number {
	return weibullQuantile(0.1, shape, scale);
}

/** Weibull mean η Γ(1 + 1/β) (NIST/SEMATECH e-Handbook §8.1.6.2). */
export function weibullMean(shape: number, scale: number): number {
	checkParameters(shape, scale);
	return scale * gamma(1 + 1 / shape);
}

/** Weibull standard deviation η √(Γ(1 + 2/β) − Γ(1 + 1/β)²) (NIST/SEMATECH §8.1.6.2). */
export function weibullStdDev(shape: number, scale: number): number {
	checkParameters(shape, scale);
	const g1 = gamma(1 + 1 / shape);
	return scale * Math.sqrt(gamma(1 + 2 / shape) - g1 * g1);
}

// Lanczos approximation, g = 7, n = 9 (coefficients as published by P. Godfrey; relative error
// about 1e-15 for real arguments).
const LANCZOS_G = 7;
const LANCZOS_COEFFICIENTS = [
	0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
	-176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
	1.5056327351493116e-7
];

/** Gamma function Γ(x) for real x (Lanczos approximation; reflection formula below 0.5). */
export function gamma(x: number): number {
	if (Number.isInteger(x) && x <= 0) return Number.NaN;
	if (x < 0.5) return Math.PI / (Math.sin(Math.PI * x) * gamma(1 - x));
	const z = x - 1;
	let a = LANCZOS_COEFFICIENTS[0];
	const t = z + LANCZOS_G + 0.5;
	for (let i = 1; i < LANCZOS_COEFFICIENTS.length; i++) a += LANCZOS_COEFFICIENTS[i] / (z + i);
	return Math.sqrt(2 * Math.PI) * Math.pow(t, z + 0.5) * Math.exp(-t) * a;
}
