import type SQLite from 'better-sqlite3';
import { rawHandle, type DB } from '../db/connect';
import type { AlloyFamily, DieProcess, DieStatus, ShotSource } from '../db/schema';
import { maxShotsIn, maxShotsPerHour } from './plausibility';

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

export interface ShotIssue {
	index: number;
	field: string;
	message: string;
}

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

export type RecordResult =
	| {
			ok: true;
			accepted: number;
			duplicates: number;
			dies: { die: string; totalShots: number }[];
			/** Per input row: counted, or skipped as an already-seen key. */
			outcome: ('counted' | 'duplicate')[];
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

const MAX_FUTURE_MS = 24 * 3_600_000;
const MAX_BATCH = 5000;

function statements(raw: SQLite.Database) {
	return {
		die: raw.prepare<[string], DieRow>(
			`select dies.id, dies.number, dies.status, dies.customer_id, dies.process, alloys.family,
			        dies.total_shots, dies.last_counted_at
			   from dies join alloys on alloys.id = dies.alloy_id where dies.number = ?`
		),
		machine: raw.prepare<[string], { id: number }>(`select id from machines where name = ? collate nocase`),
		keyExists: raw.prepare<[string], { one: number }>(`select 1 as one from shot_entries where idem_key = ?`),
		insert: raw.prepare(
			`insert into shot_entries (die_id, machine_id, counted_at, shots, counter_start, counter_end,
			   source, idem_key, entered_by, token_id, note, created_at)
			 values (@dieId, @machineId, @countedAt, @shots, @counterStart, @counterEnd,
			   @source, @key, @userId, @tokenId, @note, @createdAt)`
		),
		daily: raw.prepare(
			`insert into shot_daily (die_id, day, shots) values (?, ?, ?)
			 on conflict (die_id, day) do update set shots = shots + excluded.shots`
		),
		dieTotal: raw.prepare(
			`update dies set total_shots = total_shots + ?,
			   last_counted_at = max(coalesce(last_counted_at, ''), ?), updated_at = ? where id = ?`
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

function parseInstant(value: string | undefined, fallback: string): string | null {
	if (value === undefined || value === '') return fallback;
	const ms = Date.parse(value);
	return Number.isNaN(ms) ? null : new Date(ms).toISOString();
}

interface CheckedRow {
	index: number;
	die: DieRow;
	machineId: number | null;
	countedAt: string;
	input: ShotInput;
}

/**
 * Checks every row against the register as it is now (inside the write transaction), so the
 * answer and the write agree. Returns per-row issues; an empty list means all rows can go in.
 */
function checkRows(
	raw: SQLite.Database,
	inputs: ShotInput[],
	actor: LedgerActor,
	opts: Required<Pick<RecordOptions, 'source' | 'now'>>
): { issues: ShotIssue[]; rows: CheckedRow[] } {
	const st = prepared(raw);
	const issues: ShotIssue[] = [];
	const rows: CheckedRow[] = [];
	const dies = new Map<string, DieRow | undefined>();
	const machines = new Map<string, number | undefined>();
	// Running state per die within this batch, for plausibility and negative-total checks.
	const lastAt = new Map<number, string | null>();
	const runningTotal = new Map<number, number>();
	const nowMs = Date.parse(opts.now);
	const correction = opts.source === 'correction';

	inputs.forEach((input, index) => {
		const issue = (field: string, message: string) => issues.push({ index, field, message });
		const number = String(input.die ?? '').trim().toUpperCase();
		if (!dies.has(number)) dies.set(number, st.die.get(number));
		const die = dies.get(number);
		if (!die || (actor.customerId !== null && die.customer_id !== actor.customerId)) {
			return issue('die', `There is no die ${number || '(blank)'}.`);
		}
		if (die.status === 'retired') return issue('die', `Die ${die.number} is retired and takes no more shots.`);
		const shots = input.shots;
		if (!Number.isSafeInteger(shots)) return issue('shots', 'Shots must be a whole number.');
		if (correction) {
			if (shots === 0) return issue('shots', 'A correction must change the count (not 0).');
			if (!input.note?.trim()) return issue('note', 'A correction needs a reason.');
		} else if (shots <= 0) {
			return issue('shots', 'Shots must be a positive whole number.');
		}
		if (input.counterStart != null || input.counterEnd != null) {
			if (input.counterStart == null || input.counterEnd == null) {
				return issue('counterEnd', 'Give both counter readings, or a shot count instead.');
			}
			if (input.counterEnd < input.counterStart) {
				return issue('counterEnd', 'The counter end is below the counter start.');
			}
		}
		const countedAt = parseInstant(input.countedAt, opts.now);
		if (!countedAt) return issue('countedAt', 'Counted-at is not a date and time.');
		if (Date.parse(countedAt) - nowMs > MAX_FUTURE_MS) {
			return issue('countedAt', 'Counted-at is more than a day in the future.');
		}
		let machineId: number | null = null;
		const machineName = input.machine?.trim();
		if (machineName) {
			if (!machines.has(machineName)) machines.set(machineName, st.machine.get(machineName)?.id);
			const id = machines.get(machineName);
			if (id === undefined) return issue('machine', `There is no press called ${machineName}.`);
			machineId = id;
		}
		const total = runningTotal.get(die.id) ?? die.total_shots;
		if (total + shots < 0) {
			return issue('shots', `The correction would take die ${die.number} below zero shots (now ${total}).`);
		}
		if (!correction) {
			const previous = lastAt.has(die.id) ? lastAt.get(die.id)! : die.last_counted_at;
			if (previous && countedAt > previous) {
				const perHour = maxShotsPerHour(die.process, die.family);
				const limit = maxShotsIn(Date.parse(countedAt) - Date.parse(previous), perHour);
				if (shots > limit) {
					return issue(
						'shots',
						`${shots} shots since the last count at ${previous.slice(0, 16).replace('T', ' ')} is more than a press can make (at most ${limit} at ${perHour} shots/h).`
					);
				}
			}
			if (!previous || countedAt > previous) lastAt.set(die.id, countedAt);
		}
		runningTotal.set(die.id, total + shots);
		rows.push({ index, die, machineId, countedAt, input });
	});
	return { issues, rows };
}

class DryRunRollback extends Error {}

/**
 * Counts shots into the ledger: every row is checked, then all rows are written with die, daily
 * and active-half totals in one IMMEDIATE transaction — or nothing is written. A key seen before
 * (in the ledger or earlier in the batch) is acknowledged and not counted again.
 */
export async function recordShots(
	db: DB,
	inputs: ShotInput[],
	actor: LedgerActor,
	options: RecordOptions
): Promise<RecordResult> {
	if (inputs.length === 0) return { ok: false, issues: [{ index: 0, field: 'shots', message: 'Nothing to count.' }] };
	if (inputs.length > MAX_BATCH) {
		return { ok: false, issues: [{ index: MAX_BATCH, field: 'batch', message: `Send at most ${MAX_BATCH} entries at once.` }] };
	}
	const now = options.now ?? new Date().toISOString();
	const raw = rawHandle(db);
	return db.connection().execute(async () => {
		const run = raw.transaction((): RecordResult => {
			const { issues, rows } = checkRows(raw, inputs, actor, { source: options.source, now });
			if (issues.length) return { ok: false, issues };
			const st = prepared(raw);
			const seenKeys = new Set<string>();
			const outcome: ('counted' | 'duplicate')[] = new Array(inputs.length);
			const touched = new Map<number, DieRow>();
			const added = new Map<number, number>();
			let accepted = 0;
			for (const row of rows) {
				const key = row.input.key?.trim() || null;
				if (key && (seenKeys.has(key) || st.keyExists.get(key))) {
					outcome[row.index] = 'duplicate';
					continue;
				}
				if (key) seenKeys.add(key);
				const shots = row.input.shots;
				st.insert.run({
					dieId: row.die.id,
					machineId: row.machineId,
					countedAt: row.countedAt,
					shots,
					counterStart: row.input.counterStart ?? null,
					counterEnd: row.input.counterEnd ?? null,
					source: options.source,
					key,
					userId: actor.userId,
					tokenId: actor.tokenId,
					note: row.input.note?.trim() || null,
					createdAt: now
				});
				st.daily.run(row.die.id, row.countedAt.slice(0, 10), shots);
				st.dieTotal.run(shots, row.countedAt, now, row.die.id);
				st.halves.run(shots, row.die.id);
				if (options.source === 'correction') {
					st.audit.run(now, actor.userId, actor.tokenId, 'shots.correction', row.die.id, JSON.stringify({ shots, reason: row.input.note }));
				}
				touched.set(row.die.id, row.die);
				added.set(row.die.id, (added.get(row.die.id) ?? 0) + shots);
				outcome[row.index] = 'counted';
				accepted++;
			}
			// Dies named only by duplicates still report their total.
			for (const row of rows) touched.set(row.die.id, row.die);
			const result: RecordResult = {
				ok: true,
				accepted,
				duplicates: rows.length - accepted,
				dies: [...touched.values()].map((d) => ({ die: d.number, totalShots: d.total_shots + (added.get(d.id) ?? 0) })),
				outcome
			};
			if (options.dryRun) throw Object.assign(new DryRunRollback(), { result });
			return result;
		});
		try {
			return run.immediate();
		} catch (err) {
			if (err instanceof DryRunRollback) return (err as DryRunRollback & { result: RecordResult }).result;
			throw err;
		}
	});
}
