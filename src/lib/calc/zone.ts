// Calendar arithmetic in a named IANA time zone. Storage is UTC; a plant's days, dates and clock
// times are those of its zone. The zone rules come from @date-fns/tz (which reads the runtime's
// IANA database through Intl), never from hand-made offsets.
import { TZDate, tzOffset } from '@date-fns/tz';
import { addDays } from 'date-fns';

const pad = (n: number, width = 2) => String(n).padStart(width, '0');

/** True when `zone` is an IANA time zone name the runtime knows (e.g. `Europe/Vienna`, `UTC`). */
export function isTimeZone(zone: string): boolean {
	if (typeof zone !== 'string' || !zone.trim()) return false;
	try {
		new Intl.DateTimeFormat('en-GB', { timeZone: zone });
		return true;
	} catch {
		return false;
	}
}

function toMs(value: string | number | Date): number {
	const ms = typeof value === 'number' ? value : new Date(value).getTime();
	if (!Number.isFinite(ms)) throw new RangeError(`Not a valid date: "${String(value)}".`);
	return ms;
}

/** Wall-clock fields of an instant in `zone`. */
export function zonedFields(value: string | number | Date, zone: string) {
	// Keyed by the value as given, so a repeated ISO string is not even parsed again.
	const key =
		typeof value === 'string'
			? `${zone}|s${value}`
			: `${zone}|n${value instanceof Date ? value.getTime() : value}`;
	const known = FIELDS_SEEN.get(key);
	if (known) return { ...known };
	const d = new TZDate(toMs(value), zone);
	const fields = {
		year: d.getFullYear(),
		month: d.getMonth() + 1,
		day: d.getDate(),
		hour: d.getHours(),
		minute: d.getMinutes(),
		second: d.getSeconds()
	};
	// A zone lookup goes through Intl and is slow; a page that shows thousands of times (the
	// board's verdicts) asks for the same instants again and again. Bounded, then started afresh.
	if (FIELDS_SEEN.size >= 20_000) FIELDS_SEEN.clear();
	FIELDS_SEEN.set(key, fields);
	return { ...fields };
}
const FIELDS_SEEN = new Map<
	string,
	{ year: number; month: number; day: number; hour: number; minute: number; second: number }
>();

/** The calendar date (`YYYY-MM-DD`) of an instant in `zone`. */
export function dateInZone(value: string | number | Date, zone: string): string {
	const f = zonedFields(value, zone);
	return `${pad(f.year, 4)}-${pad(f.month)}-${pad(f.day)}`;
}

/** `YYYY-MM-DD HH:mm` of an instant on the wall clock of `zone`. */
export function dateTimeInZone(value: string | number | Date, zone: string): string {
	const f = zonedFields(value, zone);
	return `${pad(f.year, 4)}-${pad(f.month)}-${pad(f.day)} ${pad(f.hour)}:${pad(f.minute)}`;
}

/** Offset of `zone` from UTC at an instant, in minutes (Vienna in winter: 60). */
export function zoneOffsetMinutes(value: string | number | Date, zone: string): number {
	return tzOffset(zone, new Date(toMs(value)));
}

const WALL_CLOCK =
	/^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,3})\d*)?)?)?$/;

/**
 * Epoch ms of a wall-clock date and time (`YYYY-MM-DD`, `YYYY-MM-DDTHH:mm[:ss[.sss]]`, a space
 * allowed for the T) read in `zone`. A bare date is that day's midnight. Null when the text is not
 * a real calendar date and time, or when the time does not exist on that day in the zone (the
 * hour skipped when clocks go forward) — it is refused, never moved. In the hour repeated when
 * clocks go back, the later (standard-time) occurrence is taken.
 */
export function wallClockToMs(text: string, zone: string): number | null {
	const m = WALL_CLOCK.exec(text.trim());
	if (!m) return null;
	const [year, month, day, hour, minute, second] = m.slice(1, 7).map((v) => Number(v ?? 0));
	const milli = Number((m[7] ?? '0').padEnd(3, '0'));
	if (month < 1 || month > 12 || day < 1 || hour > 23 || minute > 59 || second > 59) return null;
	const d = new TZDate(year, month - 1, day, hour, minute, second, milli, zone);
	const ms = d.getTime();
	if (!Number.isFinite(ms)) return null;
	const back = zonedFields(ms, zone);
	const same =
		back.year === year &&
		back.month === month &&
		back.day === day &&
		back.hour === hour &&
		back.minute === minute &&
		back.second === second;
	return same ? ms : null;
}

/**
 * The same wall-clock time `days` calendar days later in `zone` (across a change to or from summer
 * time a "day" is 23 or 25 hours). Epoch ms.
 */
export function addCalendarDays(value: string | number | Date, days: number, zone: string): number {
	if (!Number.isInteger(days)) throw new RangeError('Days to add must be a whole number.');
	return addDays(new TZDate(toMs(value), zone), days).getTime();
}

/** Whole calendar days in `zone` from the date of `from` to the date of `to` (negative if before). */
export function calendarDaysBetween(
	from: string | number | Date,
	to: string | number | Date,
	zone: string
): number {
	const a = Date.parse(dateInZone(from, zone));
	const b = Date.parse(dateInZone(to, zone));
	return Math.round((b - a) / 86_400_000);
}

/** Epoch ms of midnight starting calendar date `date` (`YYYY-MM-DD`) in `zone`. */
export function startOfDayInZone(date: string, zone: string): number {
	const key = `${zone}|${date}`;
	const known = DAY_STARTS.get(key);
	if (known !== undefined) return known;
	const ms = new TZDate(
		Number(date.slice(0, 4)),
		Number(date.slice(5, 7)) - 1,
		Number(date.slice(8, 10)),
		zone
	).getTime();
	if (!Number.isFinite(ms)) throw new RangeError(`Not a valid date: "${date}".`);
	if (DAY_STARTS.size >= 20_000) DAY_STARTS.clear();
	DAY_STARTS.set(key, ms);
	return ms;
}
const DAY_STARTS = new Map<string, number>();
