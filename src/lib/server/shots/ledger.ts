import { dateTimeInZone, wallClockToMs } from '../../calc/zone';
import type { DB } from '../db/connect';
import { inWriteTransaction, placeholders, type SqlSession } from '../db/session';
import type { AlloyFamily, DieProcess, DieStatus, ShotSource } from '../db/schema';
import { formatShots } from '../../format';
import { dayOf } from '../time';
import { plantZone } from '../../plant-time';
import { maxShotsIn, maxShotsPerHour } from './plausibility';
import { calendarFieldsValid } from '../../calc/dates';

/** One counted entry as every source hands it in (form, CSV row, API object). */
export interface ShotInput {
	die: string;
	shots: number;
	countedAt?: string;
	machine?: string | null;
	key?: string | null;
	counterStart?: number | null;
	counterEnd?: number | null;
	note?: string | null;
	/** A person's reason for counting an entry despite plausibility warnings (form, CSV). */
	confirmReason?: string | null;
	/** Why the counter went back (a press controller swap): allows a smaller counter start. */
	resetReason?: string | null;
}

/** A plausibility warning on an accepted (or to-be-confirmed) row. */
export interface ShotWarning {
	index: number;
	message: string;
}

/** Why a row was refused. */
export interface ShotIssue {
	index: number;
	field: string;
	message: string;
	/** For a key already used for a different count: that count (the API's 409 shows it). */
	original?: {
		die: string | null;
		shots: number;
		countedAt: string;
		counterStart: number | null;
		counterEnd: number | null;
	};
}

const UNKNOWN_DIE = 'There is no die ';
/** True for the issue of a die that does not exist (or belongs to another owner): a 404 alone. */
export const isUnknownDieIssue = (i: ShotIssue) =>
	i.field === 'die' && i.message.startsWith(UNKNOWN_DIE);

const KEY_CONFLICT = 'The key ';
/** True for a key already used for a different count (the API answers a single entry 409). */
export const isKeyConflictIssue = (i: ShotIssue) =>
	i.field === 'key' && i.message.startsWith(KEY_CONFLICT) && i.original !== undefined;

/** Whose idempotency keys a caller's keys are: the plant's, or one customer's. */
export const keyScopeOf = (actor: Pick<LedgerActor, 'customerId'>) =>
	actor.customerId === null ? 'plant' : `customer:${actor.customerId}`;

interface KeyOwner {
	id: number;
	idem_key: string;
	die_id: number;
	shots: number;
	counted_at: string;
	counter_start: number | null;
	counter_end: number | null;
}

/** True for a refusal because the counter readings were already counted (overlap or went back). */
export const isCounterOverlapIssue = (i: ShotIssue) =>
	i.field === 'counterStart' && /overlaps|is below the last reading/.test(i.message);

export interface LedgerActor {
	userId: string | null;
	tokenId: number | null;
	/** A customer-bound caller may only count shots on its own dies. */
	customerId: number | null;
}

export interface RecordOptions {
	source: ShotSource;
	now?: string;
	/** Validate and report, write nothing. */
	dryRun?: boolean;
	/**
	 * What a plausibility warning does to a row without a confirm reason: `refuse` it (forms and
	 * CSV, where a person can confirm), or accept it marked "to review" (the API: a gateway must not
	 * lose counts).
	 */
	onWarning?: 'refuse' | 'review';
	/** The entry a correction replaces (voided in the same transaction). */
	replacesId?: number;
}

export type RowOutcome = 'counted' | 'duplicate';

export type RecordResult =
	| {
			ok: true;
			accepted: number;
			duplicates: number;
			dies: { die: string; totalShots: number }[];
			/** Per input row: counted, or skipped as an already-seen key. */
			outcome: RowOutcome[];
			/** Plausibility warnings of accepted rows (to review, or confirmed with a reason). */
			warnings: ShotWarning[];
			/** Ids of the entries written, in input order (empty for a dry run). */
			entryIds: number[];
	  }
	| { ok: false; issues: ShotIssue[] };

interface DieRow {
	id: number;
	number: string;
	status: DieStatus;
	customer_id: number;
	process: DieProcess;
	family: AlloyFamily;
	total_shots: number;
	last_counted_at: string | null;
}

interface HalfRow {
	id: number;
	side: string;
	installed_at: string;
	removed_at: string | null;
	shots: number;
}

interface MachineRow {
	id: number;
	name: string;
	chamber: 'hot' | 'cold';
}

/** The latest counter reset (`max(counted_at)`), if any. */
interface AtRow {
	at: string | null;
}

/** An earlier counter interval a new one runs into. */
interface IntervalRow {
	id: number;
	counted_at: string;
	counter_start: number;
	counter_end: number;
	shots: number;
	who: string | null;
	press: string | null;
}

const MAX_FUTURE_MS = 24 * 3_600_000;
export const MAX_BATCH = 5000;
/** No die makes this many shots in its life; a bigger single entry is a typing error. */
export const MAX_SHOTS_PER_ENTRY = 10_000_000;
const MAX_NOTE = 500;
const MAX_KEY = 200;
/** Counts dated before this are typing errors (a two-digit year, a swapped field). */
const EARLIEST = '2000-01-01T00:00:00.000Z';

const INTERVAL_SELECT = `select e.id, e.counted_at, e.counter_start, e.counter_end, e.shots,
	    coalesce(u.name, case when t.name is not null then 'API token ' || t.name end) as who,
	    m.name as press
	  from shot_entries e left join users u on u.id = e.entered_by
	  left join api_tokens t on t.id = e.token_id left join machines m on m.id = e.machine_id`;

/** A ledger row's columns, in the order writeRows hands their values. */
const ENTRY_COLUMNS = `die_id, machine_id, counted_at, shots, counter_start, counter_end,
	   source, idem_key, entered_by, token_id, note, created_at, counter_reset, reset_reason,
	   warning, review_state, reviewed_by, reviewed_at, review_reason, replaces_id, key_scope`;
const ENTRY_WIDTH = 21;

/**
 * The ledger's statements, written once so SQLite's statement cache (db/session.ts) hits on every
 * row, and meaning the same on PostgreSQL.
 */
const SQL = {
	die: `select dies.id, dies.number, dies.status, dies.customer_id, dies.process, alloys.family,
	        dies.total_shots, dies.last_counted_at
	   from dies join alloys on alloys.id = dies.alloy_id where dies.number = ?`,
	halvesOf: `select id, side, installed_at, removed_at, shots from die_halves
	  where die_id = ? order by side, installed_at, id`,
	machine: `select id, name, chamber from machines where lower(name) = lower(?)`,
	// Counter intervals: the latest reset at or before t, the first interval overlapping
	// [start, end) since then, and the reading just before t (to see a counter that went back).
	dieReset: `select max(counted_at) as at from shot_entries
	  where die_id = ? and counter_reset = 1 and voided_at is null and counted_at <= ?`,
	machineReset: `select max(counted_at) as at from shot_entries
	  where machine_id = ? and counter_reset = 1 and voided_at is null and counted_at <= ?`,
	dieOverlap: `${INTERVAL_SELECT} where e.die_id = ? and e.counter_end is not null and e.voided_at is null
	    and e.counter_end > ? and e.counter_start < ? and e.counted_at >= ?
	  order by e.counted_at limit 1`,
	machineOverlap: `${INTERVAL_SELECT} where e.machine_id = ? and e.machine_id is not null
	    and e.counter_end is not null and e.voided_at is null
	    and e.counter_end > ? and e.counter_start < ? and e.counted_at >= ?
	  order by e.counted_at limit 1`,
	dieLastReading: `${INTERVAL_SELECT} where e.die_id = ? and e.counter_end is not null and e.voided_at is null
	    and e.counted_at < ? and e.counted_at >= ?
	  order by e.counted_at desc limit 1`,
	// Index seek on (die_id, counted_at), walking back past corrections (they are not readings).
	previousReading: `select counted_at from shot_entries
	  where die_id = ? and counted_at < ? and source <> 'correction' and voided_at is null
	  order by counted_at desc limit 1`,
	// Positional parameters: measurably cheaper than named ones on the hot path.
	insert: `insert into shot_entries (${ENTRY_COLUMNS}) values (${placeholders(ENTRY_WIDTH)})`,
	// The target table is named on the right: PostgreSQL finds a bare `shots` ambiguous here.
	daily: `insert into shot_daily (die_id, day, shots) values (?, ?, ?)
	 on conflict (die_id, day) do update set shots = shot_daily.shots + excluded.shots`,
	// "Last counted at" only moves forward; a null reading time (a void) leaves it alone.
	dieTotal: `update dies set total_shots = total_shots + ?,
	   last_counted_at = case when cast(? as text) is null then last_counted_at
	     when last_counted_at is null or last_counted_at < cast(? as text) then cast(? as text)
	     else last_counted_at end,
	   updated_at = ? where id = ?`,
	half: `update die_halves set shots = shots + ? where id = ?`,
	audit: `insert into audit_log (at, user_id, token_id, action, die_id, detail) values (?, ?, ?, ?, ?, ?)`,
	zone: `select time_zone from plant_settings where id = 1`,
	void: `update shot_entries set voided_at = ?, voided_by = ?, void_reason = ?
	  where id = ? and voided_at is null`,
	confirm: `update shot_entries set review_state = 'confirmed', reviewed_by = ?, reviewed_at = ?,
	   review_reason = ? where id = ?`,
	dieTotalOf: `select total_shots from dies where id = ?`,
	lastInsertId: `select last_insert_rowid() as id`
};
/** PostgreSQL's types for the entry columns, to read them from one array per column. */
const ENTRY_ARRAY_TYPES = [
	'bigint', // die_id
	'bigint', // machine_id
	'text', // counted_at
	'bigint', // shots
	'bigint', // counter_start
	'bigint', // counter_end
	'text', // source
	'text', // idem_key
	'text', // entered_by
	'bigint', // token_id
	'text', // note
	'text', // created_at
	'bigint', // counter_reset
	'text', // reset_reason
	'text', // warning
	'text', // review_state
	'text', // reviewed_by
	'text', // reviewed_at
	'text', // review_reason
	'bigint', // replaces_id
	'text' // key_scope
];
/** A whole batch in one statement: ids and every column as arrays, zipped back into rows. */
const PG_INSERT = `insert into shot_entries (id, ${ENTRY_COLUMNS}) overriding system value
	  select * from unnest(cast(? as bigint[]), ${ENTRY_ARRAY_TYPES.map((type) => `cast(? as ${type}[])`).join(', ')})`;
const PG_NEXT_IDS = `select nextval(pg_get_serial_sequence('shot_entries', 'id')) as id
	  from generate_series(1, cast(? as integer))`;

/**
 * Inserts ledger rows (each `ENTRY_WIDTH` parameters, in SQL.insert's order) and answers their
 * ids in the same order. SQLite inserts row by row through one cached statement and asks for the
 * row id after each: `returning` made the whole ingest a third slower in the bench (200 000 rows:
 * 1.7 s of CPU as plain inserts, 5.1 s with `returning`). PostgreSQL, a network round trip per
 * statement, takes the ids from the table's sequence first and inserts the whole batch as one
 * `unnest` of column arrays (a 250-row VALUES list took 39 ms to parse and plan; the arrays,
 * one statement text whatever the batch size, a fraction of that).
 */
async function insertEntries(s: SqlSession, rows: unknown[][]): Promise<number[]> {
	const ids: number[] = [];
	if (s.engine === 'sqlite') {
		for (const row of rows) {
			await s.run(SQL.insert, row);
			ids.push((await s.get<{ id: number }>(SQL.lastInsertId))!.id);
		}
		return ids;
	}
	if (rows.length === 0) return ids;
	for (const r of await s.all<{ id: number }>(PG_NEXT_IDS, [rows.length])) ids.push(Number(r.id));
	const columns = ENTRY_ARRAY_TYPES.map((_, c) => rows.map((row) => row[c]));
	await s.run(PG_INSERT, [ids, ...columns]);
	return ids;
}

/**
 * The batch's keys are looked up with `in (…)` lists of a few fixed lengths (the last key repeated
 * to fill one up), so the statement cache holds four texts rather than one per batch size.
 */
const KEY_LIST_SIZES = [1, 16, 128, 1000];
const KEY_OWNERS = KEY_LIST_SIZES.map(
	(n) => `select id, idem_key, die_id, shots, counted_at, counter_start, counter_end
	   from shot_entries where key_scope = ? and idem_key in (${placeholders(n)})`
);

/** The ledger rows already holding any of `keys` in `scope`, by key. */
async function keyOwnersOf(
	s: SqlSession,
	scope: string,
	keys: readonly string[]
): Promise<Map<string, KeyOwner>> {
	const owners = new Map<string, KeyOwner>();
	const max = KEY_LIST_SIZES[KEY_LIST_SIZES.length - 1];
	for (let k = 0; k < keys.length; k += max) {
		const chunk = keys.slice(k, k + max);
		const size = KEY_LIST_SIZES.findIndex((n) => n >= chunk.length);
		const params: string[] = [scope, ...chunk];
		while (params.length < KEY_LIST_SIZES[size] + 1) params.push(chunk[chunk.length - 1]);
		for (const r of await s.all<KeyOwner>(KEY_OWNERS[size], params)) owners.set(r.idem_key, r);
	}
	return owners;
}

const LOCAL_DATE_TIME = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?$/;
/** The stored form; a press feed usually sends exactly this, so it gets a fast path. */
const CANONICAL = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/;
const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/** Epoch ms of a text already in the stored form, read digit by digit (the ingest hot path). */
function canonicalMs(t: string): number | null {
	const n = (i: number) => t.charCodeAt(i) - 48;
	const year = n(0) * 1000 + n(1) * 100 + n(2) * 10 + n(3);
	if (year < 1000) return Date.parse(t);
	const month = n(5) * 10 + n(6);
	const day = n(8) * 10 + n(9);
	const hour = n(11) * 10 + n(12);
	const minute = n(14) * 10 + n(15);
	const second = n(17) * 10 + n(18);
	if (month < 1 || month > 12 || day < 1 || hour > 23 || minute > 59 || second > 59) return null;
	const leap = month === 2 && year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
	if (day > MONTH_DAYS[month - 1] + (leap ? 1 : 0)) return null;
	return Date.UTC(year, month - 1, day, hour, minute, second, n(20) * 100 + n(21) * 10 + n(22));
}

/**
 * An instant as stored (ISO-8601 UTC) with its epoch milliseconds, or null when the text is not
 * a real date and time. A time without an offset is read as plant time (`zone`, the plant's
 * time zone) whatever the server's zone; a plant clock time skipped when summer time starts is
 * refused.
 */
export function parseInstant(value: string, zone = 'UTC'): { iso: string; ms: number } | null {
	let text = value.trim();
	if (CANONICAL.test(text)) {
		const ms = canonicalMs(text);
		return ms === null ? null : { iso: text, ms };
	}
	if (LOCAL_DATE_TIME.test(text)) {
		if (zone !== 'UTC') {
			const ms = wallClockToMs(text, zone);
			return ms === null ? null : { iso: new Date(ms).toISOString(), ms };
		}
		text = text.replace(' ', 'T') + 'Z';
	}
	if (!/^\d{4}-\d{2}-\d{2}/.test(text) || !calendarFieldsValid(text)) return null;
	const ms = Date.parse(text);
	return Number.isNaN(ms) ? null : { iso: new Date(ms).toISOString(), ms };
}

/** The stored form of an instant, or null (see parseInstant). */
export function normalizeInstant(value: string, zone = 'UTC'): string | null {
	return parseInstant(value, zone)?.iso ?? null;
}

/** Why a counted-at was not read: not a date at all, or a plant clock time that does not exist. */
export function unreadableTimeMessage(value: string, zone: string): string {
	const text = value.trim();
	if (zone !== 'UTC' && LOCAL_DATE_TIME.test(text) && parseInstant(text, 'UTC')) {
		return `${text.replace('T', ' ')} does not exist in ${zone} (the clocks skip that hour when summer time starts).`;
	}
	return 'Counted-at is not a date and time (use 2026-03-01T14:30 plant time, or add Z or an offset).';
}

/** The plant's time zone as the ledger reads it (inside its transaction). */
export async function ledgerZone(s: SqlSession): Promise<string> {
	return (await s.get<{ time_zone: string }>(SQL.zone))?.time_zone ?? 'UTC';
}

interface CheckedRow {
	index: number;
	die: DieRow;
	machineId: number | null;
	countedAt: string;
	key: string | null;
	duplicate: boolean;
	input: ShotInput;
	/** Halves installed on the die at countedAt (one per side); they take the row's shots. */
	halfIds: number[];
	/** Plausibility warnings the row is accepted with. */
	warnings: string[];
	reviewState: 'to_review' | 'confirmed' | null;
	counterReset: boolean;
}

/**
 * The halves a count at `countedAt` belongs to: per side, the half whose time on the die holds
 * it — the latest installed strictly before it (a count at the very moment of a replacement
 * closes the old half's last run). A count from before the first half on record goes to that
 * first half (opening balances carried over from an older register). Halves come sorted by side,
 * then install time.
 */
export function halvesAt(halves: readonly HalfRow[], countedAt: string): number[] {
	const ids: number[] = [];
	let side: string | null = null;
	let chosen: number | null = null;
	for (const h of halves) {
		if (h.side !== side) {
			if (chosen !== null) ids.push(chosen);
			side = h.side;
			chosen = h.id; // the first half of the side, unless a later one holds the time
		} else if (h.installed_at < countedAt) {
			// Halves of a side follow each other: the latest installed before the count holds it.
			chosen = h.id;
		}
	}
	if (chosen !== null) ids.push(chosen);
	return ids;
}

/** Sorted insert, so "latest reading before t" within a batch is a binary search. */
function insertSorted(list: number[], value: number) {
	let lo = 0;
	let hi = list.length;
	while (lo < hi) {
		const mid = (lo + hi) >> 1;
		if (list[mid] < value) lo = mid + 1;
		else hi = mid;
	}
	list.splice(lo, 0, value);
}
function latestBefore(list: number[] | undefined, value: number): number | null {
	if (!list?.length) return null;
	// Readings mostly arrive in time order: the last one is usually the answer.
	if (list[list.length - 1] < value) return list[list.length - 1];
	let lo = 0;
	let hi = list.length;
	while (lo < hi) {
		const mid = (lo + hi) >> 1;
		if (list[mid] < value) lo = mid + 1;
		else hi = mid;
	}
	return lo > 0 ? list[lo - 1] : null;
}

const isCount = (v: unknown): v is number => Number.isSafeInteger(v) && (v as number) >= 0;
const shortTime = (ms: number, zone: string = plantZone()) => `${dateTimeInZone(ms, zone)} ${zone}`;

const MIN_REASON = 5;
const counterText = (start: number, end: number) => `${formatShots(start)} → ${formatShots(end)}`;

/** "the entry of 2026-03-01 14:30 UTC by Pat Planner on HC-42M (50 200 → 50 512, 312 shots)" */
function describeEntry(e: IntervalRow): string {
	const who = e.who ? ` by ${e.who}` : '';
	const press = e.press ? ` on ${e.press}` : '';
	return `the entry of ${shortTime(Date.parse(e.counted_at))}${who}${press} (counter ${counterText(e.counter_start, e.counter_end)}, ${formatShots(e.shots)} shots)`;
}

interface BatchInterval {
	start: number;
	end: number;
	index: number;
	countedAt: string;
}
const overlapsIn = (list: BatchInterval[] | undefined, start: number, end: number) =>
	list?.find((i) => i.end > start && i.start < end);

/**
 * Checks every row against the register as it is now (inside the write transaction), so the
 * answer and the write agree. A key already in the ledger for the same die marks the row a
 * duplicate and skips the checks that depend on the die's present state, so a retried post is
 * acknowledged even after the die moved on. Returns one issue per refused row; plausibility
 * warnings either refuse the row (no confirm reason, `onWarning: 'refuse'`) or ride along with it.
 */
async function checkRows(
	s: SqlSession,
	inputs: ShotInput[],
	actor: LedgerActor,
	opts: { source: ShotSource; now: string; onWarning: 'refuse' | 'review'; zone: string }
): Promise<{ issues: ShotIssue[]; rows: CheckedRow[] }> {
	const issues: ShotIssue[] = [];
	const rows: CheckedRow[] = [];
	const dies = new Map<string, DieRow | undefined>();
	const machines = new Map<string, MachineRow | undefined>();
	const halvesByDie = new Map<number, HalfRow[]>();
	const batchKeys = new Set<string>();
	// Running state per die within this batch: readings accepted so far and the running totals.
	const readings = new Map<number, number[]>();
	const lastCountedMs = new Map<number, number>();
	const runningTotal = new Map<number, number>();
	const runningHalf = new Map<number, number>();
	const dieIntervals = new Map<number, BatchInterval[]>();
	const machineIntervals = new Map<number, BatchInterval[]>();
	const nowMs = Date.parse(opts.now);
	const correction = opts.source === 'correction';
	// Which of the batch's keys the ledger already holds: one index walk for the whole batch.
	const keys = inputs.map((i) => (typeof i?.key === 'string' ? i.key.trim() : '')).filter(Boolean);
	const keyOwners = await keyOwnersOf(s, keyScopeOf(actor), keys);

	let current = 0;
	const issue = (field: string, message: string) => {
		issues.push({ index: current, field, message });
	};
	// Each row's checks; a refusal returns its issue. Reads are awaited only on a cache miss, so a
	// gateway's batch of known dies stays a tight loop on SQLite.
	const checkRow = async (input: ShotInput, index: number): Promise<void> => {
		current = index;
		if (input === null || typeof input !== 'object') return issue('entry', 'Not an entry.');
		const number = String(input.die ?? '')
			.trim()
			.toUpperCase();
		if (!dies.has(number))
			dies.set(number, number ? await s.get<DieRow>(SQL.die, [number]) : undefined);
		const die = dies.get(number);
		// Another owner's die is answered exactly like a missing one.
		if (!die || (actor.customerId !== null && die.customer_id !== actor.customerId)) {
			return issue('die', `${UNKNOWN_DIE}${number || '(blank)'}.`);
		}

		const shots = input.shots;
		if (!Number.isSafeInteger(shots)) return issue('shots', 'Shots must be a whole number.');
		const { counterStart, counterEnd } = input;
		const byCounter = counterStart != null || counterEnd != null;
		if (byCounter) {
			if (counterStart == null || counterEnd == null) {
				return issue(
					counterStart == null ? 'counterStart' : 'counterEnd',
					'Give both counter readings, or a shot count instead.'
				);
			}
			if (!isCount(counterStart)) {
				return issue('counterStart', 'The counter start must be a whole number, 0 or more.');
			}
			if (!isCount(counterEnd)) {
				return issue('counterEnd', 'The counter end must be a whole number, 0 or more.');
			}
			if (counterEnd < counterStart) {
				return issue('counterEnd', 'The counter end is below the counter start.');
			}
			if (counterEnd === counterStart && !correction) {
				return issue(
					'counterEnd',
					'The counter did not move (end equals start): nothing to count.'
				);
			}
			if (shots !== counterEnd - counterStart) {
				return issue(
					'shots',
					`Shots (${shots}) must equal counter end minus counter start (${counterEnd - counterStart}).`
				);
			}
		}
		if (correction) {
			if (shots === 0) return issue('shots', 'A correction must change the count (not 0).');
		} else if (shots === 0) {
			return issue('shots', 'Zero shots counts nothing; leave the entry out.');
		} else if (shots < 0) {
			return issue(
				'shots',
				'Shots must be a positive whole number; a correction (toolroom lead) takes shots off.'
			);
		}
		if (Math.abs(shots) > MAX_SHOTS_PER_ENTRY) {
			return issue(
				'shots',
				`${shots} shots in one entry is not plausible (at most ${MAX_SHOTS_PER_ENTRY}).`
			);
		}
		const note = input.note?.trim() ?? '';
		if (correction && !note) return issue('note', 'A correction needs a reason.');
		if (note.length > MAX_NOTE) return issue('note', `Keep the note under ${MAX_NOTE} characters.`);
		const resetReason = input.resetReason?.trim() ?? '';
		if (resetReason) {
			if (!byCounter) {
				return issue('resetReason', 'A counter reset needs the counter start and end.');
			}
			if (resetReason.length < MIN_REASON) {
				return issue('resetReason', 'Say why the counter went back (at least 5 characters).');
			}
			if (resetReason.length > MAX_NOTE) {
				return issue('resetReason', `Keep the reason under ${MAX_NOTE} characters.`);
			}
		}
		const confirmReason = input.confirmReason?.trim() ?? '';
		if (confirmReason.length > MAX_NOTE) {
			return issue('confirmReason', `Keep the reason under ${MAX_NOTE} characters.`);
		}

		let countedAt = opts.now;
		let countedMs = nowMs;
		if (input.countedAt !== undefined && input.countedAt !== null && input.countedAt !== '') {
			const parsed =
				typeof input.countedAt === 'string' ? parseInstant(input.countedAt, opts.zone) : null;
			if (!parsed) {
				return issue('countedAt', unreadableTimeMessage(String(input.countedAt), opts.zone));
			}
			countedAt = parsed.iso;
			countedMs = parsed.ms;
		}
		if (countedMs - nowMs > MAX_FUTURE_MS) {
			return issue('countedAt', 'Counted-at is more than a day in the future.');
		}
		if (countedAt < EARLIEST) return issue('countedAt', 'Counted-at is before the year 2000.');

		let machine: MachineRow | null = null;
		const machineName = input.machine?.trim();
		if (machineName) {
			if (!machines.has(machineName)) {
				machines.set(machineName, await s.get<MachineRow>(SQL.machine, [machineName]));
			}
			const found = machines.get(machineName);
			if (found === undefined) return issue('machine', `There is no press called ${machineName}.`);
			machine = found;
		}
		const machineId = machine?.id ?? null;

		let halves = halvesByDie.get(die.id);
		if (!halves) halvesByDie.set(die.id, (halves = await s.all<HalfRow>(SQL.halvesOf, [die.id])));
		const halfIds = halvesAt(halves, countedAt);

		const key = input.key?.trim() || null;
		if (key !== null) {
			if (key.length > MAX_KEY) return issue('key', `Keep the key under ${MAX_KEY} characters.`);
			if (batchKeys.has(key)) {
				return issue(
					'key',
					`The key "${key}" appears twice in this batch; give each entry its own.`
				);
			}
			batchKeys.add(key);
			const owner = keyOwners.get(key);
			if (owner !== undefined) {
				// The same key with another count is a different entry, never a silent duplicate.
				const sameCount =
					owner.die_id === die.id &&
					owner.shots === shots &&
					(input.counterStart ?? null) === owner.counter_start &&
					(input.counterEnd ?? null) === owner.counter_end &&
					(input.countedAt == null || input.countedAt === '' || owner.counted_at === countedAt);
				if (!sameCount) {
					issues.push({
						index: current,
						field: 'key',
						message: `${KEY_CONFLICT}"${key}" was already used for a different count (${owner.shots} shots counted ${shortTime(Date.parse(owner.counted_at))}); send a new key for a new count.`,
						original: {
							die: owner.die_id === die.id ? die.number : null,
							shots: owner.shots,
							countedAt: owner.counted_at,
							counterStart: owner.counter_start,
							counterEnd: owner.counter_end
						}
					});
					return;
				}
				rows.push({
					index,
					die,
					machineId,
					countedAt,
					key,
					duplicate: true,
					input,
					halfIds,
					warnings: [],
					reviewState: null,
					counterReset: false
				});
				return;
			}
		}

		if (die.status === 'retired') {
			return issue('die', `Die ${die.number} is retired and takes no more shots.`);
		}
		const total = runningTotal.get(die.id) ?? die.total_shots;
		if (total + shots < 0) {
			return issue(
				'shots',
				`The correction would take die ${die.number} below zero shots (it has ${total}).`
			);
		}
		for (const id of halfIds) {
			const half = runningHalf.get(id) ?? halves.find((h) => h.id === id)!.shots;
			if (half + shots < 0) {
				return issue(
					'shots',
					`The correction would take a half of die ${die.number} below zero shots (the half on the die at that time has ${half}).`
				);
			}
		}

		const warnings: string[] = [];
		if (!correction && byCounter && !resetReason) {
			// Counter readings are intervals on the die's counter and the press's: no two may overlap.
			const start = counterStart!;
			const end = counterEnd!;
			const dieSince = (await s.get<AtRow>(SQL.dieReset, [die.id, countedAt]))?.at ?? EARLIEST;
			const dieClash = await s.get<IntervalRow>(SQL.dieOverlap, [die.id, start, end, dieSince]);
			if (dieClash) {
				return issue(
					'counterStart',
					`Counter ${counterText(start, end)} overlaps ${describeEntry(dieClash)} on die ${die.number}; these shots are already counted. If the counter was reset, give the reason.`
				);
			}
			const inBatch = overlapsIn(dieIntervals.get(die.id), start, end);
			if (inBatch) {
				return issue(
					'counterStart',
					`Counter ${counterText(start, end)} overlaps row ${inBatch.index + 1} of this batch (counter ${counterText(inBatch.start, inBatch.end)}) on die ${die.number}.`
				);
			}
			if (machine) {
				const since =
					(await s.get<AtRow>(SQL.machineReset, [machine.id, countedAt]))?.at ?? EARLIEST;
				const pressClash = await s.get<IntervalRow>(SQL.machineOverlap, [
					machine.id,
					start,
					end,
					since
				]);
				if (pressClash) {
					return issue(
						'counterStart',
						`Counter ${counterText(start, end)} overlaps ${describeEntry(pressClash)} on press ${machine.name}; these shots are already counted. If the counter was reset, give the reason.`
					);
				}
				const pressBatch = overlapsIn(machineIntervals.get(machine.id), start, end);
				if (pressBatch) {
					return issue(
						'counterStart',
						`Counter ${counterText(start, end)} overlaps row ${pressBatch.index + 1} of this batch (counter ${counterText(pressBatch.start, pressBatch.end)}) on press ${machine.name}.`
					);
				}
			}
			const previous = await s.get<IntervalRow>(SQL.dieLastReading, [die.id, countedAt, dieSince]);
			if (previous && start < previous.counter_end) {
				return issue(
					'counterStart',
					`The counter start ${formatShots(start)} is below the last reading ${formatShots(previous.counter_end)} (${describeEntry(previous)}). If the counter was reset, give the reason.`
				);
			}
		}
		if (!correction && byCounter) {
			let list = dieIntervals.get(die.id);
			if (!list) dieIntervals.set(die.id, (list = []));
			list.push({ start: counterStart!, end: counterEnd!, index, countedAt });
			if (machine) {
				let pl = machineIntervals.get(machine.id);
				if (!pl) machineIntervals.set(machine.id, (pl = []));
				pl.push({ start: counterStart!, end: counterEnd!, index, countedAt });
			}
		}

		if (!correction) {
			if (die.status === 'in_toolroom' || die.status === 'held') {
				warnings.push(
					`Die ${die.number} is ${die.status === 'held' ? 'held (quarantined)' : 'in the toolroom'}; it should not be running.`
				);
			}
			if (machine) {
				const dieChamber = die.process === 'hot_chamber' ? 'hot' : 'cold';
				if (machine.chamber !== dieChamber) {
					warnings.push(
						`Press ${machine.name} is a ${machine.chamber}-chamber press; die ${die.number} is made for ${dieChamber} chamber.`
					);
				}
			}
			const inBatch = latestBefore(readings.get(die.id), countedMs);
			let inLedger: number | null = null;
			if (die.last_counted_at !== null) {
				let last = lastCountedMs.get(die.id);
				if (last === undefined) lastCountedMs.set(die.id, (last = Date.parse(die.last_counted_at)));
				if (countedMs > last) inLedger = last;
				else {
					const before = (
						await s.get<{ counted_at: string }>(SQL.previousReading, [die.id, countedAt])
					)?.counted_at;
					inLedger = before ? Date.parse(before) : null;
				}
			}
			const previous =
				inBatch !== null && (inLedger === null || inBatch > inLedger) ? inBatch : inLedger;
			if (previous !== null) {
				const perHour = maxShotsPerHour(die.process, die.family);
				const limit = maxShotsIn(countedMs - previous, perHour);
				if (shots > limit) {
					warnings.push(
						`${formatShots(shots)} shots between the previous count (${shortTime(previous, opts.zone)}) and this one (${shortTime(countedMs, opts.zone)}) is more than a press can plausibly make: at most ${formatShots(limit)} at ${formatShots(perHour)} shots/h.`
					);
				}
			}
		}
		let reviewState: CheckedRow['reviewState'] = null;
		if (warnings.length) {
			if (confirmReason.length >= MIN_REASON) reviewState = 'confirmed';
			else if (opts.onWarning === 'review') reviewState = 'to_review';
			else {
				return issue(
					'confirm',
					`${warnings.join(' ')} To count it anyway, confirm with a reason${confirmReason ? ' (at least 5 characters)' : ''}.`
				);
			}
		}

		if (!correction) {
			let list = readings.get(die.id);
			if (!list) readings.set(die.id, (list = []));
			insertSorted(list, countedMs);
		}
		runningTotal.set(die.id, total + shots);
		for (const id of halfIds) {
			runningHalf.set(id, (runningHalf.get(id) ?? halves.find((h) => h.id === id)!.shots) + shots);
		}
		rows.push({
			index,
			die,
			machineId,
			countedAt,
			key,
			duplicate: false,
			input,
			halfIds,
			warnings,
			reviewState,
			counterReset: Boolean(resetReason)
		});
	};
	for (let index = 0; index < inputs.length; index++) await checkRow(inputs[index], index);
	return { issues, rows };
}

/** The answer for rows that passed every check; `added` holds the shots per die id. */
function summarize(
	rows: CheckedRow[],
	total: number,
	added: Map<number, number>,
	entryIds: number[]
): RecordResult {
	const outcome: RowOutcome[] = new Array(total);
	const touched = new Map<number, DieRow>();
	const warnings: ShotWarning[] = [];
	let accepted = 0;
	for (const row of rows) {
		outcome[row.index] = row.duplicate ? 'duplicate' : 'counted';
		if (!row.duplicate) accepted++;
		for (const message of row.warnings) warnings.push({ index: row.index, message });
		// Dies named only by duplicates still report their total.
		touched.set(row.die.id, row.die);
	}
	return {
		ok: true,
		accepted,
		duplicates: rows.length - accepted,
		dies: [...touched.values()].map((d) => ({
			die: d.number,
			totalShots: d.total_shots + (added.get(d.id) ?? 0)
		})),
		outcome,
		warnings,
		entryIds
	};
}

/**
 * Adds `shots` (negative to take off) to the die total, the credited halves and the daily
 * roll-up: the one place every ledger change moves the kept totals.
 */
async function moveTotals(
	s: SqlSession,
	change: { dieId: number; halfIds: readonly number[]; countedAt: string; shots: number },
	lastCountedAt: string | null,
	now: string
) {
	await s.run(SQL.daily, [change.dieId, dayOf(change.countedAt), change.shots]);
	await moveDieTotal(s, change.dieId, change.shots, lastCountedAt, now);
	for (const id of change.halfIds) await s.run(SQL.half, [change.shots, id]);
}

/** Adds shots to the kept die total; a reading time moves "last counted at" forward only. */
function moveDieTotal(
	s: SqlSession,
	dieId: number,
	shots: number,
	lastCountedAt: string | null,
	now: string
) {
	return s.run(SQL.dieTotal, [shots, lastCountedAt, lastCountedAt, lastCountedAt, now, dieId]);
}

/** One audit row of a ledger change. */
function audit(
	s: SqlSession,
	now: string,
	actor: LedgerActor,
	action: string,
	dieId: number,
	detail: unknown
) {
	return s.run(SQL.audit, [
		now,
		actor.userId,
		actor.tokenId,
		action,
		dieId,
		JSON.stringify(detail)
	]);
}

/** Writes checked rows and moves the totals; runs inside the caller's transaction. */
async function writeRows(
	s: SqlSession,
	rows: CheckedRow[],
	actor: LedgerActor,
	source: ShotSource,
	now: string,
	replacesId: number | null
): Promise<{ added: Map<number, number>; entryIds: number[] }> {
	const scope = keyScopeOf(actor);
	const added = new Map<number, number>();
	const entries: unknown[][] = [];
	const daily = new Map<string, { dieId: number; day: string; shots: number }>();
	const latest = new Map<number, string>();
	const halves = new Map<number, { dieId: number; shots: number }>();
	for (const row of rows) {
		if (row.duplicate) continue;
		const shots = row.input.shots;
		added.set(row.die.id, (added.get(row.die.id) ?? 0) + shots);
		const confirmed = row.reviewState === 'confirmed';
		entries.push([
			row.die.id,
			row.machineId,
			row.countedAt,
			shots,
			row.input.counterStart ?? null,
			row.input.counterEnd ?? null,
			source,
			row.key,
			actor.userId,
			actor.tokenId,
			row.input.note?.trim() || null,
			now,
			row.counterReset ? 1 : 0,
			row.counterReset ? row.input.resetReason!.trim() : null,
			row.warnings.length ? row.warnings.join('\n') : null,
			row.reviewState,
			confirmed ? actor.userId : null,
			confirmed ? now : null,
			confirmed ? row.input.confirmReason!.trim() : null,
			replacesId,
			scope
		]);
		const day = dayOf(row.countedAt);
		const dayKey = `${row.die.id}|${day}`;
		const d = daily.get(dayKey);
		if (d) d.shots += shots;
		else daily.set(dayKey, { dieId: row.die.id, day, shots });
		for (const id of row.halfIds) {
			const h = halves.get(id);
			if (h) h.shots += shots;
			else halves.set(id, { dieId: row.die.id, shots });
		}
		// A correction is not a reading: it leaves "last counted at" (and so the rate check) alone.
		if (source !== 'correction') {
			const prev = latest.get(row.die.id);
			if (!prev || row.countedAt > prev) latest.set(row.die.id, row.countedAt);
		}
		if (source === 'correction') {
			await audit(s, now, actor, 'shots.correction', row.die.id, {
				shots,
				reason: row.input.note?.trim(),
				countedAt: row.countedAt
			});
		}
		if (row.counterReset) {
			await audit(s, now, actor, 'shots.counter_reset', row.die.id, {
				counterStart: row.input.counterStart,
				counterEnd: row.input.counterEnd,
				reason: row.input.resetReason?.trim()
			});
		}
	}
	const entryIds = await insertEntries(s, entries);
	// Totals are applied once per die, half and die-day per batch: a gateway's batch stays cheap.
	for (const d of daily.values()) await s.run(SQL.daily, [d.dieId, d.day, d.shots]);
	for (const [dieId, shots] of added) {
		await moveDieTotal(s, dieId, shots, latest.get(dieId) ?? null, now);
	}
	for (const [id, h] of halves) await s.run(SQL.half, [h.shots, id]);
	return { added, entryIds };
}

/**
 * Counts shots into the ledger: every row is checked, then all rows are written with die, daily
 * and half totals (each row credited to the halves on the die at its counted-at) in one
 * IMMEDIATE transaction — or nothing is written. A key seen before for the same die is
 * acknowledged and not counted again.
 */
export async function recordShots(
	db: DB,
	inputs: ShotInput[],
	actor: LedgerActor,
	options: RecordOptions
): Promise<RecordResult> {
	if (!Array.isArray(inputs) || inputs.length === 0) {
		return { ok: false, issues: [{ index: 0, field: 'batch', message: 'Nothing to count.' }] };
	}
	if (inputs.length > MAX_BATCH) {
		return {
			ok: false,
			issues: [
				{
					index: MAX_BATCH,
					field: 'batch',
					message: `Send at most ${MAX_BATCH} entries at once (this batch has ${inputs.length}).`
				}
			]
		};
	}
	const now = (options.now && normalizeInstant(options.now)) || new Date().toISOString();
	// A dry run answers from the same checks and rolls back (on SQLite it takes no write lock).
	return inWriteTransaction(db, { lock: 'ledger', rollback: options.dryRun }, (s) =>
		recordRowsNow(s, inputs, actor, options, now)
	);
}

async function recordRowsNow(
	s: SqlSession,
	inputs: ShotInput[],
	actor: LedgerActor,
	options: RecordOptions,
	now: string
): Promise<RecordResult> {
	const source = options.source;
	const { issues, rows } = await checkRows(s, inputs, actor, {
		source,
		now,
		onWarning: options.onWarning ?? 'refuse',
		zone: await ledgerZone(s)
	});
	if (issues.length) return { ok: false, issues };
	if (options.dryRun) {
		const added = new Map<number, number>();
		for (const row of rows) {
			if (!row.duplicate) added.set(row.die.id, (added.get(row.die.id) ?? 0) + row.input.shots);
		}
		return summarize(rows, inputs.length, added, []);
	}
	const { added, entryIds } = await writeRows(
		s,
		rows,
		actor,
		source,
		now,
		options.replacesId ?? null
	);
	return summarize(rows, inputs.length, added, entryIds);
}

/** A ledger entry as the correct/void/confirm actions see it. */
interface EntryRow {
	id: number;
	die_id: number;
	die_number: string;
	machine: string | null;
	counted_at: string;
	shots: number;
	counter_start: number | null;
	counter_end: number | null;
	source: ShotSource;
	note: string | null;
	voided_at: string | null;
	review_state: string | null;
	warning: string | null;
}

const ENTRY_SELECT = `select e.id, e.die_id, d.number as die_number, m.name as machine, e.counted_at,
	  e.shots, e.counter_start, e.counter_end, e.source, e.note, e.voided_at, e.review_state, e.warning
	  from shot_entries e join dies d on d.id = e.die_id left join machines m on m.id = e.machine_id
	 where e.id = ? and d.number = ?`;

export type EntryChangeResult =
	| { ok: true; entryId: number; dieTotal: number }
	| { ok: false; field: string; message: string; issues?: ShotIssue[] };

function checkReason(reason: string, what: string): string | null {
	const r = reason.trim();
	if (r.length < MIN_REASON) return `Give the reason for the ${what} (at least 5 characters).`;
	if (r.length > MAX_NOTE) return `Keep the reason under ${MAX_NOTE} characters.`;
	return null;
}

/** Takes a live entry out of the totals and marks it voided (inside the caller's transaction). */
async function voidNow(
	s: SqlSession,
	entry: EntryRow,
	reason: string,
	actor: LedgerActor,
	now: string
) {
	const halves = await s.all<HalfRow>(SQL.halvesOf, [entry.die_id]);
	await s.run(SQL.void, [now, actor.userId, reason, entry.id]);
	await moveTotals(
		s,
		{
			dieId: entry.die_id,
			halfIds: halvesAt(halves, entry.counted_at),
			countedAt: entry.counted_at,
			shots: -entry.shots
		},
		null,
		now
	);
}

/** The kept die total after a change. */
const dieTotalOf = async (s: SqlSession, dieId: number) =>
	(await s.get<{ total_shots: number }>(SQL.dieTotalOf, [dieId]))!.total_shots;

/**
 * The frame every change to one entry shares: the reason is checked, then, in one IMMEDIATE
 * transaction under the ledger's connection lock, the entry is found on the named die and handed
 * to `change`. A thrown RefusedCorrection rolls everything back and comes back as a refusal.
 */
async function changeEntry(
	db: DB,
	dieNumber: string,
	entryId: number,
	reason: string,
	what: string,
	change: (s: SqlSession, entry: EntryRow, reason: string) => Promise<EntryChangeResult>
): Promise<EntryChangeResult> {
	const problem = checkReason(reason, what);
	if (problem) return { ok: false, field: 'reason', message: problem };
	try {
		return await inWriteTransaction(db, { lock: 'ledger' }, async (s) => {
			const entry = await s.get<EntryRow>(ENTRY_SELECT, [entryId, dieNumber]);
			if (!entry) {
				return { ok: false, field: 'entry', message: 'There is no such entry on this die.' };
			}
			return change(s, entry, reason.trim());
		});
	} catch (e) {
		if (!(e instanceof RefusedCorrection)) throw e;
		const first = e.issues[0];
		return { ok: false, field: first.field, message: first.message, issues: e.issues };
	}
}

class RefusedCorrection extends Error {
	constructor(readonly issues: ShotIssue[]) {
		super('Correction refused');
	}
}

/**
 * Voids a ledger entry (toolroom lead, with a reason): the entry stays in the ledger, shown struck
 * through, and its shots come off the die, the halves that took them and the daily roll-up in the
 * same transaction. Audited. A voided entry cannot be voided again.
 */
export function voidShotEntry(
	db: DB,
	dieNumber: string,
	entryId: number,
	reason: string,
	actor: LedgerActor,
	now = new Date().toISOString()
): Promise<EntryChangeResult> {
	return changeEntry(db, dieNumber, entryId, reason, 'void', async (s, entry, why) => {
		if (entry.voided_at) {
			return { ok: false, field: 'entry', message: 'This entry is already voided.' };
		}
		const total = await dieTotalOf(s, entry.die_id);
		if (total - entry.shots < 0) {
			return {
				ok: false,
				field: 'entry',
				message: `Voiding it would take die ${entry.die_number} below zero shots (it has ${total}).`
			};
		}
		await voidNow(s, entry, why, actor, now);
		await audit(s, now, actor, 'shots.void', entry.die_id, {
			entry: entry.id,
			shots: entry.shots,
			countedAt: entry.counted_at,
			reason: why
		});
		return { ok: true, entryId: entry.id, dieTotal: await dieTotalOf(s, entry.die_id) };
	});
}

export interface EntryCorrection {
	shots?: number;
	countedAt?: string;
	counterStart?: number | null;
	counterEnd?: number | null;
	machine?: string | null;
}

/**
 * Corrects a ledger entry (toolroom lead, with a reason): the old entry is voided and a new one
 * with the corrected figures is counted in its place, in one transaction, checked like any entry
 * (its counters against the others, its shots credited to the halves on the die at its time).
 * Warnings on the new figures are taken as confirmed by the lead's reason. Audited.
 */
export function correctShotEntry(
	db: DB,
	dieNumber: string,
	entryId: number,
	change: EntryCorrection,
	reason: string,
	actor: LedgerActor,
	now = new Date().toISOString()
): Promise<EntryChangeResult> {
	return changeEntry(db, dieNumber, entryId, reason, 'correction', async (s, entry, why) => {
		if (entry.voided_at) {
			return { ok: false, field: 'entry', message: 'A voided entry cannot be corrected.' };
		}
		if (entry.source === 'correction') {
			return {
				ok: false,
				field: 'entry',
				message: 'A correcting entry is not corrected; void it and post a new correction.'
			};
		}
		const counterStart =
			change.counterStart !== undefined ? change.counterStart : entry.counter_start;
		const counterEnd = change.counterEnd !== undefined ? change.counterEnd : entry.counter_end;
		const byCounter = counterStart != null && counterEnd != null;
		const shots = byCounter ? counterEnd - counterStart : (change.shots ?? entry.shots);
		await voidNow(s, entry, why, actor, now);
		const input: ShotInput = {
			die: entry.die_number,
			shots,
			countedAt: change.countedAt || entry.counted_at,
			machine: change.machine !== undefined ? change.machine : entry.machine,
			counterStart: byCounter ? counterStart : null,
			counterEnd: byCounter ? counterEnd : null,
			note: entry.note,
			confirmReason: why
		};
		const result = await recordRowsNow(
			s,
			[input],
			actor,
			{ source: entry.source, replacesId: entry.id },
			now
		);
		// Throwing rolls the void back with the refused replacement.
		if (!result.ok) throw new RefusedCorrection(result.issues);
		await audit(s, now, actor, 'shots.correct', entry.die_id, {
			entry: entry.id,
			replacedBy: result.entryIds[0],
			from: { shots: entry.shots, countedAt: entry.counted_at },
			to: { shots, countedAt: input.countedAt },
			reason: why
		});
		return { ok: true, entryId: result.entryIds[0], dieTotal: await dieTotalOf(s, entry.die_id) };
	});
}

/**
 * Confirms an entry that came in "to review" (toolroom lead, with a reason): it keeps counting as
 * it did and leaves the review list. Audited.
 */
export function confirmShotEntry(
	db: DB,
	dieNumber: string,
	entryId: number,
	reason: string,
	actor: LedgerActor,
	now = new Date().toISOString()
): Promise<EntryChangeResult> {
	return changeEntry(db, dieNumber, entryId, reason, 'confirmation', async (s, entry, why) => {
		if (entry.voided_at || entry.review_state !== 'to_review') {
			return { ok: false, field: 'entry', message: 'This entry is not waiting for review.' };
		}
		await s.run(SQL.confirm, [actor.userId, now, why, entry.id]);
		await audit(s, now, actor, 'shots.confirm', entry.die_id, {
			entry: entry.id,
			warning: entry.warning,
			reason: why
		});
		return { ok: true, entryId: entry.id, dieTotal: await dieTotalOf(s, entry.die_id) };
	});
}
