/** Current time as ISO-8601 UTC text, the one date format stored in the database. */
export function nowIso(): string {
	return new Date().toISOString();
}

/** YYYY-MM-DD (UTC) of an ISO timestamp. */
export function dayOf(iso: string): string {
	return iso.slice(0, 10);
}
