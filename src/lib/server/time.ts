import { plantDate } from '../plant-time';

/** Current time as ISO-8601 UTC text, the one date format stored in the database. */
export function nowIso(): string {
	return new Date().toISOString();
}

/** YYYY-MM-DD plant date of an ISO timestamp (see plant-time.ts). */
export function dayOf(iso: string): string {
	return plantDate(iso);
}
