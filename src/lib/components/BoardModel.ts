// Turns the board's compact JSON (GET /api/v1/board) into rows the timeline and the phone list
// draw. Runs in the browser once per fetch; linear in the size of the answer.
import type { BoardData } from '$lib/server/schedule/board';
import { plantDayStart } from '$lib/plant-time';

export type { BoardData };

const DAY_MS = 86_400_000;
const WEEKDAYS = ['Su', 'Mo', 'Tu', 'We', 'Th', 'Fr', 'Sa'];

export type BarVerdict = 'fits' | 'warning' | 'blocked';

export interface BoardBooking {
	id: number;
	/** The die's number (the press view labels bars by die). */
	die: string;
	press: string;
	start: string;
	end: string;
	startMs: number;
	endMs: number;
	order: string;
	parts: number;
	phase: string;
	/** The one verdict on the run now; null once it has ended. */
	verdict: BarVerdict | null;
	why: string | null;
}
export interface BoardWindow {
	id: number;
	start: string;
	end: string;
	startMs: number;
	endMs: number;
	kind: string;
	note: string | null;
	job: string | null;
}
export interface BoardJob {
	number: string;
	kind: string;
	status: string;
	openedAt: string;
	fromMs: number;
}
export interface BoardService {
	day: string;
	dayMs: number;
	kind: string;
	state: string;
}
export interface BoardRow {
	index: number;
	number: string;
	part: string;
	owner: string;
	family: string;
	status: string;
	lifeUsedPct: number;
	/** The press the die is counting on now, from the press feed. */
	livePress: string | null;
	bookings: BoardBooking[];
	jobs: BoardJob[];
	service: BoardService[];
	windows: BoardWindow[];
}
/** A press row of the press view: its bookings, each naming its die. */
export interface PressRow {
	index: number;
	name: string;
	detail: string;
	down: boolean;
	bookings: BoardBooking[];
}
export interface BoardDay {
	iso: string;
	label: string;
	weekday: string;
	weekend: boolean;
	monday: boolean;
	today: boolean;
}
export interface BoardModel {
	fromMs: number;
	toMs: number;
	nowMs: number;
	days: BoardDay[];
	rows: BoardRow[];
}

export function buildBoardModel(data: BoardData, nowMs = Date.now()): BoardModel {
	// Columns are plant days: the timeline starts at plant midnight of `from`.
	const fromMs = Date.parse(plantDayStart(data.from));
	const toMs = Date.parse(plantDayStart(data.to));
	const days: BoardDay[] = [];
	const firstDay = Date.parse(data.from);
	for (let t = firstDay; t < Date.parse(data.to); t += DAY_MS) {
		const d = new Date(t);
		const iso = d.toISOString().slice(0, 10);
		days.push({
			iso,
			label:
				d.getUTCDate() === 1 || t === firstDay
					? `${d.getUTCDate()} ${d.toLocaleString('en-GB', { month: 'short', timeZone: 'UTC' })}`
					: String(d.getUTCDate()),
			weekday: WEEKDAYS[d.getUTCDay()],
			weekend: d.getUTCDay() === 0 || d.getUTCDay() === 6,
			monday: d.getUTCDay() === 1,
			today: iso === data.today
		});
	}
	const rows: BoardRow[] = data.dies.rows.map(
		([number, part, owner, family, status, lifeUsedPct], index) => ({
			index,
			number,
			part,
			owner,
			family,
			status,
			lifeUsedPct,
			livePress: null,
			bookings: [],
			jobs: [],
			service: [],
			windows: []
		})
	);
	for (const [id, die, press, start, end, order, parts, phase, verdict, why] of data.bookings
		.rows) {
		rows[die]?.bookings.push({
			id,
			die: rows[die].number,
			press,
			start,
			end,
			startMs: Date.parse(start),
			endMs: Date.parse(end),
			order,
			parts,
			phase,
			verdict: verdict ?? null,
			why: why ?? null
		});
	}
	for (const [die, id, start, end, kind, note, job] of data.windows?.rows ?? []) {
		rows[die]?.windows.push({
			id,
			start,
			end,
			startMs: Date.parse(start),
			endMs: Date.parse(end),
			kind,
			note,
			job
		});
	}
	for (const [die, number, kind, status, openedAt] of data.jobs.rows) {
		rows[die]?.jobs.push({ number, kind, status, openedAt, fromMs: Date.parse(openedAt) });
	}
	for (const [die, press] of data.live?.rows ?? []) {
		if (rows[die]) rows[die].livePress = press;
	}
	for (const [die, day, kind, state] of data.service.rows) {
		rows[die]?.service.push({ day, dayMs: Date.parse(day), kind, state });
	}
	return { fromMs, toMs, nowMs, days, rows };
}

/** True when the die is in a state that stops it (a bar for the state, job or not). */
export const isStopped = (row: Pick<BoardRow, 'status'>) =>
	row.status === 'in_toolroom' || row.status === 'held';

/** True when the die has anything in the window (for the phone list, which skips free dies). */
export const hasActivity = (row: BoardRow) =>
	row.livePress !== null ||
	isStopped(row) ||
	row.bookings.length > 0 ||
	row.jobs.length > 0 ||
	row.service.length > 0 ||
	row.windows.length > 0;

/**
 * The press view: one row per press (in the order given), holding every booking of the window on
 * it, soonest first. Presses with nothing booked keep their row — that is where free time shows.
 */
export function buildPressRows(
	model: BoardModel,
	presses: readonly { name: string; detail: string; down: boolean }[]
): PressRow[] {
	const rows: PressRow[] = presses.map((p, index) => ({ index, ...p, bookings: [] }));
	const byName = new Map(rows.map((r) => [r.name, r]));
	for (const row of model.rows) {
		for (const b of row.bookings) {
			let target = byName.get(b.press);
			if (!target) {
				target = { index: rows.length, name: b.press, detail: '', down: false, bookings: [] };
				rows.push(target);
				byName.set(b.press, target);
			}
			target.bookings.push(b);
		}
	}
	for (const r of rows) r.bookings.sort((a, b) => a.startMs - b.startMs);
	return rows;
}

/**
 * The longest label that fits a bar `px` wide (about 6.5 px a character at the bar's size), the
 * last one always kept: a bar is never left with nothing on it.
 */
export function labelForWidth(px: number, forms: readonly string[]): string {
	for (const f of forms) if (f.length * 6.5 + 8 <= px) return f;
	return forms[forms.length - 1];
}

/** A query string from the set values only (empty ones are left out of the URL). */
export function queryString(params: Record<string, string | number | null | undefined>): string {
	const parts: string[] = [];
	for (const [k, v] of Object.entries(params)) {
		if (v === null || v === undefined || v === '') continue;
		parts.push(`${encodeURIComponent(k)}=${encodeURIComponent(String(v))}`);
	}
	return parts.join('&');
}
