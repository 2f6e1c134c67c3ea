import { addDaysToDate } from './dates';

// When to order a replacement die: the projected end of life less the time a new die takes to
// arrive (the replacement lead time). Ordering on that date lets the new die arrive as the old
// one wears out — common practice for planning tool replacement.

/**
 * The reorder-by date (`YYYY-MM-DD`): `leadDays` calendar days before the projected end of life.
 * Null when there is no projection (the die has not run recently).
 */
export function reorderByDate(projectedEndOfLife: string | null, leadDays: number): string | null {
	if (projectedEndOfLife === null) return null;
	if (!Number.isInteger(leadDays) || leadDays < 0) {
		throw new RangeError('A replacement lead time is a whole number of days, 0 or more.');
	}
	return addDaysToDate(projectedEndOfLife, -leadDays);
}

/** True when the reorder-by date has come (on or before `today`, both `YYYY-MM-DD`). */
export function isReorderDue(reorderBy: string | null, today: string): boolean {
	return reorderBy !== null && reorderBy <= today;
}
