import { sql } from 'kysely';
import { plantDayStart } from '../../plant-time';
import type { ShotListQuery } from '../../schemas/shots';
import type { DB } from '../db/connect';
import { equalsIgnoringCase, startsWithText } from '../db/portable';
import type { ReviewState, ShotSource } from '../db/schema';

export interface ShotListRow {
	id: number;
	countedAt: string;
	die: string;
	partName: string;
	shots: number;
	counterStart: number | null;
	counterEnd: number | null;
	source: ShotSource;
	press: string | null;
	enteredBy: string | null;
	token: string | null;
	note: string | null;
	key: string | null;
	createdAt: string;
	reviewState: ReviewState | null;
	voidedAt: string | null;
	voidReason: string | null;
}

export interface ShotListPage {
	rows: ShotListRow[];
	/** Cursor for the page after the last row (older), or null at the end. */
	olderCursor: string | null;
	/** Cursor for the page before the first row (newer), or null on the newest page. */
	newerCursor: string | null;
	/** Die number searched for matched no die, or the press filter names no press. */
	nothingMatches: boolean;
}

const MAX_DIES_PER_SEARCH = 500;
/** Up to this many dies, each die's index is sought and the rows merged (bench-register.ts). */
const FEW_DIES = 8;
/** Rows in one CSV export; a wider span is exported in date slices. */
export const SHOT_EXPORT_LIMIT = 100_000;

const cursorOf = (r: { countedAt: string; id: number }) => `${r.countedAt}_${r.id}`;
function splitCursor(cursor: string): [string, number] {
	const at = cursor.lastIndexOf('_');
	return [cursor.slice(0, at), Number(cursor.slice(at + 1))];
}
// Filter dates are plant dates: a day runs from plant midnight to the next plant midnight.
const dayAfter = (day: string) =>
	plantDayStart(new Date(Date.parse(day) + 86_400_000).toISOString().slice(0, 10));

/**
 * Die ids a search names: the exact die when there is one, else dies whose number starts with
 * the text. Resolved first so the ledger query filters on die_id and walks its index.
 */
async function resolveDies(db: DB, q: string): Promise<number[] | null> {
	if (!q) return null;
	const exact = await db.selectFrom('dies').select('id').where('number', '=', q).executeTakeFirst();
	if (exact) return [exact.id];
	const rows = await db
		.selectFrom('dies')
		.select('id')
		.where(startsWithText(db, sql`number`, q))
		.orderBy('number')
		.limit(MAX_DIES_PER_SEARCH)
		.execute();
	return rows.map((r) => r.id);
}

/**
 * The ledger, newest first, narrowed by the URL filters, one keyset page at a time: "older" and
 * "newer" continue from the last or first row shown, so page 5000 costs what page 1 costs.
 * Every filter has an index ending in counted_at (migration 2026_12_01_2330).
 */
export async function listShotEntries(
	db: DB,
	query: ShotListQuery,
	limit = query.size
): Promise<ShotListPage> {
	const empty = { rows: [], olderCursor: null, newerCursor: null, nothingMatches: true };
	const [dieIds, machine] = await Promise.all([
		resolveDies(db, query.q),
		query.press
			? db
					.selectFrom('machines')
					.select('id')
					.where(equalsIgnoringCase(sql`name`, query.press))
					.executeTakeFirst()
			: Promise.resolve(null)
	]);
	if ((dieIds && dieIds.length === 0) || (query.press && !machine)) return empty;

	const newerFirst = !query.after;
	// Left joins keep shot_entries the outer loop, so SQLite walks its index in counted_at order.
	let q = db
		.selectFrom('shot_entries as e')
		.leftJoin('dies', 'dies.id', 'e.die_id')
		.leftJoin('machines', 'machines.id', 'e.machine_id')
		.leftJoin('users', 'users.id', 'e.entered_by')
		.leftJoin('api_tokens', 'api_tokens.id', 'e.token_id')
		.select([
			'e.id',
			'e.counted_at as countedAt',
			'dies.number as die',
			'dies.part_name as partName',
			'e.shots',
			'e.counter_start as counterStart',
			'e.counter_end as counterEnd',
			'e.source',
			'machines.name as press',
			'users.name as enteredBy',
			'api_tokens.name as token',
			'e.note',
			'e.idem_key as key',
			'e.created_at as createdAt',
			'e.review_state as reviewState',
			'e.voided_at as voidedAt',
			'e.void_reason as voidReason'
		]);
	if (dieIds && dieIds.length <= FEW_DIES) {
		q = q.where('e.die_id', 'in', dieIds);
	} else if (dieIds) {
		// Many dies: seeking each and sorting all their rows costs more than walking the time index
		// and keeping theirs; the unary + stops SQLite from choosing the die index.
		q = q.where(sql<boolean>`+e.die_id in (${sql.join(dieIds)})`);
	}
	if (query.source) q = q.where('e.source', '=', query.source);
	if (machine) q = q.where('e.machine_id', '=', machine.id);
	if (query.from) q = q.where('e.counted_at', '>=', plantDayStart(query.from));
	if (query.to) q = q.where('e.counted_at', '<', dayAfter(query.to));
	if (query.before) {
		const [at, id] = splitCursor(query.before);
		q = q.where(sql<boolean>`(e.counted_at, e.id) < (${at}, ${id})`);
	} else if (query.after) {
		const [at, id] = splitCursor(query.after);
		q = q.where(sql<boolean>`(e.counted_at, e.id) > (${at}, ${id})`);
	}
	const dir = newerFirst ? 'desc' : 'asc';
	const fetched = await q
		.orderBy('e.counted_at', dir)
		.orderBy('e.id', dir)
		.limit(limit + 1)
		.execute();
	const more = fetched.length > limit;
	const rows = (fetched.slice(0, limit) as ShotListRow[]).map((r) => ({
		...r,
		die: r.die ?? '?',
		partName: r.partName ?? ''
	}));
	if (!newerFirst) rows.reverse();
	const first = rows[0];
	const last = rows[rows.length - 1];
	const hasOlder = newerFirst ? more : true;
	const hasNewer = query.before ? true : query.after ? more : false;
	return {
		rows,
		olderCursor: last && hasOlder ? cursorOf(last) : null,
		newerCursor: first && hasNewer ? cursorOf(first) : null,
		nothingMatches: false
	};
}

/** Presses for filters and the press-run form. */
export async function listPresses(db: DB) {
	return db
		.selectFrom('machines')
		.select(['id', 'name', 'chamber', 'status'])
		.orderBy('chamber')
		.orderBy('name')
		.execute();
}

/** Dies that still take shots, for the die input's suggestions. */
export async function listActiveDieChoices(db: DB) {
	return db
		.selectFrom('dies')
		.select(['number', 'part_name as partName'])
		.where('status', '!=', 'retired')
		.orderBy('number')
		.execute();
}
