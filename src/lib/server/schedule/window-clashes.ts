import type { DB } from '../db/connect';

/** A service window of a die that overlaps a run; what the verdict needs to say why it blocks. */
export interface WindowClash {
	id: number;
	dieId: number;
	starts_at: string;
	ends_at: string;
	kind: string;
	note: string | null;
}

/**
 * Service windows (not cancelled) of these dies overlapping [start, end); touching ends do not
 * overlap, as with bookings. Read by the verdict so every surface that judges a run sees them.
 */
export async function findWindowClashes(
	db: DB,
	dieIds: readonly number[],
	startsAt: string,
	endsAt: string
): Promise<WindowClash[]> {
	if (dieIds.length === 0) return [];
	const rows = await db
		.selectFrom('service_windows')
		.select(['id', 'die_id', 'starts_at', 'ends_at', 'kind', 'note'])
		.where('die_id', 'in', [...dieIds])
		.where('cancelled_at', 'is', null)
		.where('starts_at', '<', endsAt)
		.where('ends_at', '>', startsAt)
		.orderBy('starts_at')
		.execute();
	return rows.map((r) => ({
		id: r.id,
		dieId: r.die_id,
		starts_at: r.starts_at,
		ends_at: r.ends_at,
		kind: r.kind,
		note: r.note
	}));
}

/** Ends of a die's service windows (not cancelled) ending in [from, to): where slots can open. */
export async function listWindowsOfDie(db: DB, dieId: number, from: string, to: string) {
	return db
		.selectFrom('service_windows')
		.select(['starts_at', 'ends_at'])
		.where('die_id', '=', dieId)
		.where('cancelled_at', 'is', null)
		.where('ends_at', '>', from)
		.where('ends_at', '<', to)
		.execute();
}
