// Plant time: the one place that turns stored UTC instants into the plant's dates and clock times
// and reads what people type back into UTC. Pages, exports, e-mails and the ledger all call it.
//
// A server process serves one plant, so the zone is process-wide: the server sets it from the
// plant settings (and again whenever an admin changes them); the browser gets it from the root
// layout's data. Functions take an explicit zone where a caller must not depend on that state.
import {
	calendarDaysBetween,
	dateInZone,
	dateTimeInZone,
	isTimeZone,
	startOfDayInZone,
	wallClockToMs,
	zonedFields,
	zoneOffsetMinutes
} from './calc/zone';

/** The zone a plant runs in until an admin picks one. */
export const DEFAULT_PLANT_ZONE = 'UTC';

let currentZone: string = DEFAULT_PLANT_ZONE;

/** Sets the plant's zone for this process (an unknown name is refused, the zone stays). */
export function setPlantZone(zone: string): void {
	if (!isTimeZone(zone)) throw new RangeError(`"${zone}" is not a known time zone.`);
	currentZone = zone;
}

/** The plant's IANA zone name, e.g. `Europe/Vienna`. */
export function plantZone(): string {
	return currentZone;
}

/** Sentence naming the zone once on a page, export or e-mail. */
export function plantTimeNote(zone = currentZone): string {
	return `Dates and times are plant time (${zone}).`;
}

/** Plant calendar date `YYYY-MM-DD` of a stored instant. */
export function plantDate(iso: string | number | Date, zone = currentZone): string {
	return dateInZone(iso, zone);
}

/** `YYYY-MM-DD HH:mm` on the plant's clock. */
export function plantDateTime(iso: string | number | Date, zone = currentZone): string {
	return dateTimeInZone(iso, zone);
}

/**
 * ISO-8601 timestamp on the plant's clock with its offset (`2026-01-15T14:30:00+01:00`): plant
 * time in exports, still one exact instant for any program that reads it back.
 */
export function plantTimestamp(iso: string | number | Date, zone = currentZone): string {
	const ms = typeof iso === 'number' ? iso : new Date(iso).getTime();
	const f = zonedFields(ms, zone);
	const offset = zoneOffsetMinutes(ms, zone);
	const sign = offset < 0 ? '-' : '+';
	const abs = Math.abs(offset);
	const p2 = (n: number) => String(n).padStart(2, '0');
	return (
		`${dateInZone(ms, zone)}T${p2(f.hour)}:${p2(f.minute)}:${p2(f.second)}` +
		`${sign}${p2(Math.floor(abs / 60))}:${p2(abs % 60)}`
	);
}

/** Today's date at the plant. */
export function plantToday(now: string | number | Date = Date.now(), zone = currentZone): string {
	return dateInZone(now, zone);
}

/** The value a `datetime-local` input shows for a stored instant: `YYYY-MM-DDTHH:mm`, plant clock. */
export function toPlantInput(iso: string | number | Date, zone = currentZone): string {
	return dateTimeInZone(iso, zone).replace(' ', 'T');
}

/**
 * Reads a date and time typed or sent without an offset (`2026-03-01T14:30`, `2026-03-01 14:30`)
 * as plant time; text with `Z` or an offset is taken as it says. Returns ISO UTC text, or null
 * when it is not a real date and time — including a clock time the plant skips when summer time
 * starts.
 */
export function readPlantDateTime(text: string, zone = currentZone): string | null {
	const value = text.trim();
	if (!/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test(value)) return null;
	if (/(Z|[+-]\d{2}:?\d{2})$/i.test(value)) {
		const ms = Date.parse(value.replace(' ', 'T'));
		return Number.isFinite(ms) && wallClockToMs(value.slice(0, 16), 'UTC') !== null
			? new Date(ms).toISOString()
			: null;
	}
	const ms = wallClockToMs(value, zone);
	return ms === null ? null : new Date(ms).toISOString();
}

/** ISO UTC instant of the plant midnight that starts `date` (`YYYY-MM-DD`). */
export function plantDayStart(date: string, zone = currentZone): string {
	return new Date(startOfDayInZone(date, zone)).toISOString();
}

/**
 * ISO instant of noon on plant date `day`: the instant a daily roll-up row stands for when rates
 * are taken over a trailing window.
 */
export function plantNoon(day: string, zone = currentZone): string {
	return new Date(startOfDayInZone(day, zone) + 12 * 3_600_000).toISOString();
}

/** Whole plant calendar days from the date of `from` to the date of `to`. */
export function plantDaysBetween(
	from: string | number | Date,
	to: string | number | Date,
	zone = currentZone
): number {
	return calendarDaysBetween(from, to, zone);
}

let zoneList: string[] | null = null;
/** IANA zone names the runtime knows, UTC first, for the settings list. */
export function listTimeZones(): string[] {
	if (!zoneList) {
		const names = Intl.supportedValuesOf('timeZone').filter((z) => z !== 'UTC');
		zoneList = ['UTC', ...names];
	}
	return zoneList;
}
