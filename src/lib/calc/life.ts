import { MS_PER_DAY, isoDateOf, parseInstant, projectDate } from './dates';

/** Alloy families as Castellan groups them; brass belongs to the copper family. */
export type AlloyFamily = 'zinc' | 'magnesium' | 'aluminium' | 'copper';

export const ALLOY_FAMILIES: readonly AlloyFamily[] = ['zinc', 'magnesium', 'aluminium', 'copper'];

/**
 * Average die life in shots by alloy family — NADCA FAQ "Alloy properties — processing and
 * production" (brass listed there stands for the copper family). Plant default, editable per
 * alloy and per die.
 */
export const DEFAULT_EXPECTED_LIFE_BY_FAMILY: Readonly<Record<AlloyFamily, number>> = {
	zinc: 500_000,
	magnesium: 200_000,
	aluminium: 125_000,
	copper: 20_000
};

/** Typical production rate range in shots per hour — NADCA FAQ (as above). */
export const TYPICAL_SHOTS_PER_HOUR: Readonly<Record<AlloyFamily, { min: number; max: number }>> = {
	zinc: { min: 200, max: 550 },
	magnesium: { min: 75, max: 400 },
	aluminium: { min: 40, max: 200 },
	copper: { min: 40, max: 200 }
};

/**
 * Upper plausibility bound for any shot rate, shots per hour: very small zinc parts on
 * hot-chamber machines reach about 18 000 (common practice). Above this an entry is a typo.
 */
export const MAX_PLAUSIBLE_SHOTS_PER_HOUR = 18_000;

/** Length of the trailing window for the shot rate, days. */
export const TRAILING_RATE_DAYS = 28;

export interface LifeInput {
	/** Shots on the die so far. */
	totalShots: number;
	/** Expected life of the die, shots. */
	expectedLifeShots: number;
	/** Ledger entries; `at` is an ISO date or timestamp (a bare date means the end of that day). */
	recentShots: readonly { at: string; shots: number }[];
	/** Reference instant; a bare date means the end of that day. */
	asOf: string;
}

export interface LifeStatus {
	/** Share of expected life used, percent (may exceed 100). */
	lifeUsedPct: number;
	/** Shots left to expected life, never negative. */
	shotsRemaining: number;
	/** Trailing 28-day rate, shots per day. */
	shotsPerDay: number;
	/**
	 * UTC date (`YYYY-MM-DD`) on which the die reaches expected life at the trailing rate
	 * (whole days rounded up); the as-of date when life is already used up; null when the
	 * die has not run in the window (or the date would fall after 9999-12-31).
	 */
	projectedEndOfLife: string | null;
}

/**
 * Life used, shots remaining and projected end-of-life date from the trailing 28-day shot rate
 * (shots with `at` in (asOf − 28 d, asOf], divided by 28). Plain arithmetic, no published source.
 */
export function lifeStatus(input: LifeInput): LifeStatus {
	const { totalShots, expectedLifeShots, recentShots, asOf } = input;
	if (!(expectedLifeShots > 0) || !Number.isFinite(expectedLifeShots)) {
		throw new RangeError('Expected life must be a positive number of shots.');
	}
	if (!(totalShots >= 0) || !Number.isFinite(totalShots)) {
		throw new RangeError('Total shots must be zero or more.');
	}
	const end = parseInstant(asOf);
	const start = end - TRAILING_RATE_DAYS * MS_PER_DAY;
	let windowShots = 0;
	for (const entry of recentShots) {
		const at = parseInstant(entry.at);
		if (at > start && at <= end) windowShots += entry.shots;
	}
	// Corrections can make the window sum negative; a die does not un-run.
	const shotsPerDay = Math.max(0, windowShots) / TRAILING_RATE_DAYS;
	const shotsRemaining = Math.max(0, expectedLifeShots - totalShots);

	let projectedEndOfLife: string | null;
	if (shotsRemaining <= 0) projectedEndOfLife = isoDateOf(asOf);
	else if (shotsPerDay <= 0) projectedEndOfLife = null;
	else projectedEndOfLife = projectDate(asOf, shotsRemaining / shotsPerDay);

	return {
		lifeUsedPct: (totalShots / expectedLifeShots) * 100,
		shotsRemaining,
		shotsPerDay,
		projectedEndOfLife
	};
}
