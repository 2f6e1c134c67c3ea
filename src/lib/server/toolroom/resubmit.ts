/** Catching a second press of "Open job": Back, then submit again, must not open a twin job. */
import type { DB } from '../db/connect';

const OPEN = ['open', 'in_progress', 'waiting_parts'] as const;

/**
 * The open job on this die that the submitting page did not know of (opened after the page was
 * shown, typically by the same form a moment ago), or null. `known` is the list of open job
 * numbers the form showed; null means the caller did not say, and nothing is caught.
 */
export async function findJobOpenedMeanwhile(
	db: DB,
	dieId: number,
	known: readonly string[] | null
): Promise<string | null> {
	if (known === null) return null;
	const open = await db
		.selectFrom('toolroom_jobs')
		.select('number')
		.where('die_id', '=', dieId)
		.where('status', 'in', [...OPEN])
		.orderBy('opened_at', 'desc')
		.orderBy('id', 'desc')
		.execute();
	const seen = new Set(known.map((n) => n.trim().toUpperCase()));
	return open.find((j) => !seen.has(j.number))?.number ?? null;
}

/** The form's `knownOpenJobs` field: comma-separated job numbers; absent → null. */
export function parseKnownOpenJobs(value: FormDataEntryValue | null): string[] | null {
	if (typeof value !== 'string') return null;
	return value
		.split(',')
		.map((s) => s.trim())
		.filter((s) => /^[A-Z]{1,4}-\d{1,9}$/i.test(s));
}

/** How long after opening a job the same person's same request is taken as a second press. */
export const TWIN_WINDOW_MINUTES = 15;

/**
 * The open job this person opened on this die for the same kind of work, with the same words,
 * within the last TWIN_WINDOW_MINUTES, or null. Browser Back re-renders the form with the new job already listed,
 * so the form's own list cannot tell a second press from a deliberate second job; this can.
 * A deliberate second job of the same kind is opened with `openAnother` ticked.
 */
export async function findRecentTwin(
	db: DB,
	input: { dieId: number; userId: string; kind: string; description: string; now: string }
): Promise<string | null> {
	const since = new Date(Date.parse(input.now) - TWIN_WINDOW_MINUTES * 60_000).toISOString();
	const row = await db
		.selectFrom('toolroom_jobs')
		.select('number')
		.where('die_id', '=', input.dieId)
		.where('opened_by', '=', input.userId)
		.where('kind', '=', input.kind)
		.where('description', '=', input.description.trim())
		.where('status', 'in', [...OPEN])
		.where('opened_at', '>=', since)
		.orderBy('opened_at', 'desc')
		.executeTakeFirst();
	return row?.number ?? null;
}
