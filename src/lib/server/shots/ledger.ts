import type SQLite from 'better-sqlite3';
import { rawHandle, type DB } from '../db/connect';
import type { AlloyFamily, DieProcess, DieStatus, ShotSource } from '../db/schema';
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
}

/** Why a row was refused. */
export interface ShotIssue {
	index: number;
	field: string;
	message: string;
}

const UNKNOWN_DIE = 'There is no die ';
/** True for the issue of a die that does not exist (or belongs to another owner): a 404 alone. */
export const isUnknownDieIssue = (i: ShotIssue) =>
	i.field === 'die' && i.message.startsWith(UNKNOWN_DIE);

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
	min_half_shots: number | null;
}

const MAX_FUTURE_MS = 24 * 3_600_000;
export const MAX_BATCH = 5000;
/** No die makes this many shots in its life; a bigger single entry is a typing error. */
export const MAX_SHOTS_PER_ENTRY = 10_000_000;
const MAX_NOTE = 500;
const MAX_KEY = 200;
/** Counts dated before this are typing errors (a two-digit year, a swapped field). */
const EARLIEST = '2000-01-01T00:00:00.000Z';

function statements(raw: SQLite.Database) {
	return {
		die: raw.prepare<[string], DieRow>(
			`select dies.id, dies.number, dies.status, dies.customer_id, dies.process, alloys.family,
			        dies.total_shots, dies.last_counted_at,
			        (select min(h.shots) from die_halves h where h.die_id = dies.id and h.active = 1)
			          as min_half_shots
			   from dies join alloys on alloys.id = dies.alloy_id where dies.number = ?`
		),
		machine: raw.prepare<[string], { id: number }>(
			`select id from machines where name = ? collate nocase`
		),
		keyOwners: raw.prepare<string[], { idem_key: string; die_id: number }>(
			`select idem_key, die_id from shot_entries
			  where idem_key in (select value from json_each(?)) and idem_key is not null`
		),
		// Index seek on (die_id, counted_at), walking back past corrections (they are not readings).
		previousReading: raw.prepare<[number, string], { counted_at: string }>(
			`select counted_at from shot_entries
			  where die_id = ? and counted_at < ? and source <> 'correction'
			  order by counted_at desc limit 1`
		),
		// Positional parameters: measurably cheaper than named ones on the hot path.
		insert: raw.prepare(
			`insert into shot_entries (die_id, machine_id, counted_at, shots, counter_start, counter_end,
			   source, idem_key, entered_by, token_id, note, created_at)
			 values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`
		),
		daily: raw.prepare(
			`insert into shot_daily (die_id, day, shots) values (?, ?, ?)
			 on conflict (die_id, day) do update set shots = shots + excluded.shots`
		),
		dieTotal: raw.prepare(
			`update dies set total_shots = total_shots + ?,
			   last_counted_at = case when ? is null then last_counted_at
			     else max(coalesce(last_counted_at, ''), ?) end,
			   updated_at = ? where id = ?`
		),
		halves: raw.prepare(`update die_halves set shots = shots + ? where die_id = ? and active = 1`),
		audit: raw.prepare(
			`insert into audit_log (at, user_id, token_id, action, die_id, detail) values (?, ?, ?, ?, ?, ?)`
		)
	};
}
const statementCache = new WeakMap<SQLite.Database, ReturnType<typeof statements>>();
function prepared(raw: SQLite.Database) {
	let s = statementCache.get(raw);
	if (!s) statementCache.set(raw, (s = statements(raw)));
	return s;
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
 * a real date and time. A time without an offset is read as UTC — the one zone Castellan shows —
 * whatever the server's zone.
 */
export function parseInstant(value: string): { iso: string; ms: number } | null {
	let text = value.trim();
	if (CANONICAL.test(text)) {
		const ms = canonicalMs(text);
		return ms === null ? null : { iso: text, ms };
	}
	if (LOCAL_DATE_TIME.test(text)) text = text.replace(' ', 'T') + 'Z';
	if (!/^\d{4}-\d{2}-\d{2}/.test(text) || !calendarFieldsValid(text)) return null;
	const ms = Date.parse(text);
	return Number.isNaN(ms) ? null : { iso: new Date(ms).toISOString(), ms };
}

/** The stored form of an instant, or null (see parseInstant). */
export function normalizeInstant(value: string): string | null {
	return parseInstant(value)?.iso ?? null;
}

interface CheckedRow {
	index: number;
	die: DieRow;
	machineId: number | null;
	countedAt: string;
	key: string | null;
	duplicate: boolean;
	input: ShotInput;
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
const shortTime = (ms: number) =>
	`${new Date(ms).toISOString().slice(0, 16).replace('T', ' ')} UTC`;

/**
 * Checks every row against the register as it is now (inside the write transaction), so the
 * answer and the write agree. A key already in the ledger for the same die marks the row a
 * duplicate and skips the checks that depend on the die's present state, so a retried post is
 * acknowledged even after the die moved on. Returns one issue per refused row.
 */
function checkRows(
	raw: SQLite.Database,
	inputs: ShotInput[],
	actor: LedgerActor,
	opts: { source: ShotSource; now: string }
): { issues: ShotIssue[]; rows: CheckedRow[] } {
	const st = prepared(raw);
	const issues: ShotIssue[] = [];
	const rows: CheckedRow[] = [];
	const dies = new Map<string, DieRow | undefined>();
	const machines = new Map<string, number | undefined>();
	const batchKeys = new Set<string>();
	// Running state per die within this batch: readings accepted so far and the running totals.
	const readings = new Map<number, number[]>();
	const lastCountedMs = new Map<number, number>();
	const runningTotal = new Map<number, number>();
	const runningHalf = new Map<number, number | null>();
	const nowMs = Date.parse(opts.now);
	const correction = opts.source === 'correction';
	// Which of the batch's keys the ledger already holds: one index walk for the whole batch.
	const keyOwners = new Map<string, number>();
	const keys = inputs.map((i) => (typeof i?.key === 'string' ? i.key.trim() : '')).filter(Boolean);
	for (let k = 0; k < keys.length; k += 1000) {
		for (const r of st.keyOwners.all(JSON.stringify(keys.slice(k, k + 1000)))) {
			keyOwners.set(r.idem_key, r.die_id);
		}
	}

	let current = 0;
	const issue = (field: string, message: string) => {
		issues.push({ index: current, field, message });
	};
	inputs.forEach((input, index) => {
		current = index;
		if (input === null || typeof input !== 'object') return issue('entry', 'Not an entry.');
		const number = String(input.die ?? '')
			.trim()
			.toUpperCase();
		if (!dies.has(number)) dies.set(number, number ? st.die.get(number) : undefined);
		const die = dies.get(number);
		// Another owner's die is answered exactly like a missing one.
		if (!die || (actor.customerId !== null && die.customer_id !== actor.customerId)) {
			return issue('die', `${UNKNOWN_DIE}${number || '(blank)'}.`);
		}

		const shots = input.shots;
		if (!Number.isSafeInteger(shots)) return issue('shots', 'Shots must be a whole number.');
		const { counterStart, counterEnd } = input;
		if (counterStart != null || counterEnd != null) {
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

		let countedAt = opts.now;
		let countedMs = nowMs;
		if (input.countedAt !== undefined && input.countedAt !== null && input.countedAt !== '') {
			const parsed = typeof input.countedAt === 'string' ? parseInstant(input.countedAt) : null;
			if (!parsed) {
				return issue('countedAt', 'Counted-at is not a date and time (use 2026-03-01T14:30:00Z).');
			}
			countedAt = parsed.iso;
			countedMs = parsed.ms;
		}
		if (countedMs - nowMs > MAX_FUTURE_MS) {
			return issue('countedAt', 'Counted-at is more than a day in the future.');
		}
		if (countedAt < EARLIEST) return issue('countedAt', 'Counted-at is before the year 2000.');

		let machineId: number | null = null;
		const machineName = input.machine?.trim();
		if (machineName) {
			if (!machines.has(machineName)) machines.set(machineName, st.machine.get(machineName)?.id);
			const id = machines.get(machineName);
			if (id === undefined) return issue('machine', `There is no press called ${machineName}.`);
			machineId = id;
		}

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
				if (owner !== die.id) {
					return issue('key', `The key "${key}" was already used for another die's count.`);
				}
				rows.push({ index, die, machineId, countedAt, key, duplicate: true, input });
				return;
			}
		}

		if (die.status === 'retired') {
			return issue('die', `Die ${die.number} is retired and takes no more shots.`);
		}
		const total = runningTotal.get(die.id) ?? die.total_shots;
		const halfLow = runningHalf.has(die.id) ? runningHalf.get(die.id)! : die.min_half_shots;
		if (total + shots < 0) {
			return issue(
				'shots',
				`The correction would take die ${die.number} below zero shots (it has ${total}).`
			);
		}
		if (halfLow !== null && halfLow + shots < 0) {
			return issue(
				'shots',
				`The correction would take a half of die ${die.number} below zero shots (the newer half has ${halfLow}).`
			);
		}

		if (!correction) {
			const inBatch = latestBefore(readings.get(die.id), countedMs);
			let inLedger: number | null = null;
			if (die.last_counted_at !== null) {
				let last = lastCountedMs.get(die.id);
				if (last === undefined) lastCountedMs.set(die.id, (last = Date.parse(die.last_counted_at)));
				if (countedMs > last) inLedger = last;
				else {
					const before = st.previousReading.get(die.id, countedAt)?.counted_at;
					inLedger = before ? Date.parse(before) : null;
				}
			}
			const previous =
				inBatch !== null && (inLedger === null || inBatch > inLedger) ? inBatch : inLedger;
			if (previous !== null) {
				const perHour = maxShotsPerHour(die.process, die.family);
				const limit = maxShotsIn(countedMs - previous, perHour);
				if (shots > limit) {
					return issue(
						'shots',
						`${shots} shots between the previous count (${shortTime(previous)}) and this one (${shortTime(countedMs)}) is more than a press can make: at most ${limit} at ${perHour} shots/h.`
					);
				}
			}
			let list = readings.get(die.id);
			if (!list) readings.set(die.id, (list = []));
			insertSorted(list, countedMs);
		}
		runningTotal.set(die.id, total + shots);
		if (halfLow !== null) runningHalf.set(die.id, halfLow + shots);
		rows.push({ index, die, machineId, countedAt, key, duplicate: false, input });
	});
	return { issues, rows };
}

/** The answer for rows that passed every check; `added` holds the shots per die id. */
function summarize(rows: CheckedRow[], total: number, added: Map<number, number>): RecordResult {
	const outcome: RowOutcome[] = new Array(total);
	const touched = new Map<number, DieRow>();
	let accepted = 0;
	for (const row of rows) {
		outcome[row.index] = row.duplicate ? 'duplicate' : 'counted';
		if (!row.duplicate) accepted++;
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
		outcome
	};
}

/**
 * Counts shots into the ledger: every row is checked, then all rows are written with die, daily
 * and active-half totals in one IMMEDIATE transaction — or nothing is written. A key seen before
 * for the same die is acknowledged and not counted again. Totals are applied once per die (and
 * per die-day) per batch, which keeps a gateway's batch of readings cheap.
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
	const source = options.source;
	const raw = rawHandle(db);
	return db.connection().execute(async () => {
		const run = raw.transaction((): RecordResult => {
			const { issues, rows } = checkRows(raw, inputs, actor, { source, now });
			if (issues.length) return { ok: false, issues };
			const added = new Map<number, number>();
			for (const row of rows) {
				if (!row.duplicate) added.set(row.die.id, (added.get(row.die.id) ?? 0) + row.input.shots);
			}
			if (options.dryRun) return summarize(rows, inputs.length, added);

			const st = prepared(raw);
			const daily = new Map<string, { dieId: number; day: string; shots: number }>();
			const latest = new Map<number, string>();
			for (const row of rows) {
				if (row.duplicate) continue;
				const shots = row.input.shots;
				st.insert.run(
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
					now
				);
				const day = row.countedAt.slice(0, 10);
				const dayKey = `${row.die.id}|${day}`;
				const d = daily.get(dayKey);
				if (d) d.shots += shots;
				else daily.set(dayKey, { dieId: row.die.id, day, shots });
				// A correction is not a reading: it leaves "last counted at" (and so the rate check) alone.
				if (source !== 'correction') {
					const prev = latest.get(row.die.id);
					if (!prev || row.countedAt > prev) latest.set(row.die.id, row.countedAt);
				}
				if (source === 'correction') {
					st.audit.run(
						now,
						actor.userId,
						actor.tokenId,
						'shots.correction',
						row.die.id,
						JSON.stringify({ shots, reason: row.input.note?.trim(), countedAt: row.countedAt })
					);
				}
			}
			for (const d of daily.values()) st.daily.run(d.dieId, d.day, d.shots);
			for (const [dieId, shots] of added) {
				const at = latest.get(dieId) ?? null;
				st.dieTotal.run(shots, at, at, now, dieId);
				st.halves.run(shots, dieId);
			}
			return summarize(rows, inputs.length, added);
		});
		// A dry run only reads; it needs no write lock.
		return options.dryRun ? run.deferred() : run.immediate();
	});
}
