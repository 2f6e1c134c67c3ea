// The press gateway's bookkeeping, free of MQTT and HTTP: successive readings of each press's
// cumulative shot counter become counter intervals (start → end) credited to the die mounted at
// the time. Everything here is plain data so the whole state can be written to a file and read
// back after a restart, and the same readings always give the same entries and keys.

/** One ledger entry as the gateway will post it to `POST /api/v1/shots`. */
export interface GatewayEntry {
	/** Idempotency key: press, counter epoch and counter start — the same interval, the same key. */
	key: string;
	press: string;
	die: string | null;
	counterStart: number;
	counterEnd: number;
	shots: number;
	/** Time of the last reading in the interval (the press's clock, ISO-8601). */
	countedAt: string;
	/** Set when the interval starts after a counter reset or rollover. */
	resetFrom: number | null;
}

interface OpenInterval {
	start: number;
	end: number;
	at: string;
	die: string | null;
	resetFrom: number | null;
}

export interface PressState {
	/** Counts counter resets; part of every key so an interval after a reset never reuses one. */
	epoch: number;
	/** The last reading taken in (not necessarily delivered). */
	last: { counter: number; at: string } | null;
	open: OpenInterval | null;
	/** The mounted die, as the press said it, or as Castellan answered when the press says nothing. */
	die: string | null;
	dieAt: string | null;
	dieSource: 'press' | 'castellan' | null;
}

export interface RefusedEntry {
	entry: GatewayEntry;
	reason: string;
	at: string;
}

export interface GatewayState {
	version: 1;
	presses: Record<string, PressState>;
	/** Closed intervals waiting for Castellan's acknowledgement, oldest first. */
	outbox: GatewayEntry[];
	/** Closed intervals with no die to credit: kept and reported, never dropped. */
	unassigned: GatewayEntry[];
	/** Entries Castellan refused (unknown press or die, overlap…): kept and reported. */
	refused: RefusedEntry[];
}

export type ReadingOutcome = 'baseline' | 'counted' | 'unchanged' | 'reset' | 'stale' | 'invalid';

export function emptyState(): GatewayState {
	return { version: 1, presses: {}, outbox: [], unassigned: [], refused: [] };
}

function pressState(state: GatewayState, press: string): PressState {
	let p = state.presses[press];
	if (!p) {
		p = { epoch: 0, last: null, open: null, die: null, dieAt: null, dieSource: null };
		state.presses[press] = p;
	}
	return p;
}

const isCounter = (v: unknown): v is number => Number.isSafeInteger(v) && (v as number) >= 0;
const instantMs = (at: string) => Date.parse(at);

/** Moves the press's open interval (if any) to the outbox, or to `unassigned` without a die. */
export function closeInterval(state: GatewayState, press: string): GatewayEntry | null {
	const p = state.presses[press];
	if (!p?.open) return null;
	const o = p.open;
	p.open = null;
	const entry: GatewayEntry = {
		key: `gw:${press}:${p.epoch}:${o.start}`,
		press,
		die: o.die,
		counterStart: o.start,
		counterEnd: o.end,
		shots: o.end - o.start,
		countedAt: o.at,
		resetFrom: o.resetFrom
	};
	if (entry.die === null) state.unassigned.push(entry);
	else state.outbox.push(entry);
	return entry;
}

/**
 * Takes in one counter reading. The first reading of a press is its baseline (shots before it
 * were counted some other way); a reading older than the last one is a redelivery and changes
 * nothing; a smaller value later in time is a reset or rollover: the interval so far is closed
 * and a new one starts from zero in the next counter epoch, never a negative count.
 */
export function takeReading(
	state: GatewayState,
	press: string,
	counter: unknown,
	at: unknown
): ReadingOutcome {
	if (!isCounter(counter) || typeof at !== 'string' || Number.isNaN(instantMs(at))) {
		return 'invalid';
	}
	const p = pressState(state, press);
	if (p.last === null) {
		p.last = { counter, at };
		return 'baseline';
	}
	if (instantMs(at) <= instantMs(p.last.at)) return 'stale';
	const previous = p.last.counter;
	p.last = { counter, at };
	if (counter === previous) return 'unchanged';
	if (counter > previous) {
		if (p.open) {
			p.open.end = counter;
			p.open.at = at;
		} else {
			p.open = { start: previous, end: counter, at, die: p.die, resetFrom: null };
		}
		return 'counted';
	}
	closeInterval(state, press);
	p.epoch += 1;
	if (counter > 0) p.open = { start: 0, end: counter, at, die: p.die, resetFrom: previous };
	return 'reset';
}

/**
 * The press says another die is mounted. Shots up to the change belong to the old die, so the
 * open interval is closed first; when the message carries the counter at the change, that
 * reading is taken in before the switch.
 */
export function changeDie(
	state: GatewayState,
	press: string,
	die: string | null,
	at: string,
	counter?: unknown
): void {
	const p = pressState(state, press);
	if (p.dieAt !== null && p.dieSource === 'press' && instantMs(at) <= instantMs(p.dieAt)) return;
	if (counter !== undefined) takeReading(state, press, counter, at);
	if (p.die !== die) closeInterval(state, press);
	p.die = die;
	p.dieAt = at;
	p.dieSource = 'press';
}

/** Castellan's answer for a press that does not report its die (running state or booking). */
export function adoptMountedDie(state: GatewayState, press: string, die: string | null): void {
	const p = pressState(state, press);
	if (p.dieSource === 'press') return;
	if (p.open && p.open.die === null) p.open.die = die;
	else if (p.die !== die) closeInterval(state, press);
	p.die = die;
	p.dieSource = die === null ? null : 'castellan';
}

/** The flush: at most one entry per press per interval. */
export function closeAllIntervals(state: GatewayState): number {
	let n = 0;
	for (const press of Object.keys(state.presses)) if (closeInterval(state, press)) n++;
	return n;
}

/** Presses with counts waiting and no die known from the press itself: ask Castellan. */
export function pressesNeedingDie(state: GatewayState): string[] {
	return Object.entries(state.presses)
		.filter(([, p]) => p.dieSource !== 'press' && p.open !== null)
		.map(([name]) => name);
}

/** A message as taken in: what the journal keeps, so a replay gives the same state. */
export type PressRecord =
	| { press: string; kind: 'counter'; counter: unknown; at: string }
	| { press: string; kind: 'die'; die: string | null; at: string; counter?: unknown };

/** Applies one record; the outcome of a counter reading, or null for a die message. */
export function applyRecord(state: GatewayState, r: PressRecord): ReadingOutcome | null {
	if (r.kind === 'counter') return takeReading(state, r.press, r.counter, r.at);
	changeDie(state, r.press, r.die, r.at, r.counter);
	return null;
}
