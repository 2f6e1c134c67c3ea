// Plant-time display and input helpers. Offsets checked here come from the EU summer-time rule
// (Directive 2000/84/EC: summer time from the last Sunday of March 01:00 UTC to the last Sunday of
// October 01:00 UTC; Vienna is UTC+1 in winter, UTC+2 in summer) and from Queensland keeping
// UTC+10 all year (IANA tz database, Australia/Brisbane). Each expected value is worked out by
// hand in the comment beside it.
import { afterEach, describe, expect, test } from 'vitest';
import { formatDate, formatDateTime } from './format';
import {
	listTimeZones,
	plantDate,
	plantDateTime,
	plantDayStart,
	plantDaysBetween,
	plantNoon,
	plantTimeNote,
	plantToday,
	plantZone,
	readPlantDateTime,
	setPlantZone,
	toPlantInput
} from './plant-time';

afterEach(() => setPlantZone('UTC'));

describe('display helpers show plant time', () => {
	test('UTC plant: the stored instant as it is', () => {
		expect(formatDateTime('2026-01-15T23:30:00.000Z')).toBe('2026-01-15 23:30');
		expect(formatDate('2026-01-15T23:30:00.000Z')).toBe('2026-01-15');
	});

	test('Vienna in winter (UTC+1): 23:30 UTC is 00:30 the next day', () => {
		setPlantZone('Europe/Vienna');
		expect(formatDateTime('2026-01-15T23:30:00.000Z')).toBe('2026-01-16 00:30');
		expect(formatDate('2026-01-15T23:30:00.000Z')).toBe('2026-01-16');
	});

	test('Vienna in summer (UTC+2): 21:59 UTC is 23:59, 22:00 UTC is the next day', () => {
		setPlantZone('Europe/Vienna');
		expect(formatDateTime('2026-07-01T21:59:00.000Z')).toBe('2026-07-01 23:59');
		expect(formatDateTime('2026-07-01T22:00:00.000Z')).toBe('2026-07-02 00:00');
	});

	test('Brisbane (UTC+10): 13:59 UTC is 23:59, 14:00 UTC is midnight of the next day', () => {
		expect(plantDateTime('2026-06-09T13:59:00Z', 'Australia/Brisbane')).toBe('2026-06-09 23:59');
		expect(plantDate('2026-06-09T14:00:00Z', 'Australia/Brisbane')).toBe('2026-06-10');
	});

	test('a bare date is shown as it is; missing values as a dash', () => {
		setPlantZone('Australia/Brisbane');
		expect(formatDate('2026-06-09')).toBe('2026-06-09');
		expect(formatDate(null)).toBe('—');
		expect(formatDateTime(undefined)).toBe('—');
	});

	test('the zone is named once, in a sentence', () => {
		setPlantZone('Europe/Vienna');
		expect(plantTimeNote()).toBe('Dates and times are plant time (Europe/Vienna).');
	});

	test('today is the plant date', () => {
		// 22:30 UTC on 9 June is 08:30 on 10 June in Brisbane, 00:30 on 10 June in Vienna (UTC+2).
		expect(plantToday('2026-06-09T22:30:00Z', 'Australia/Brisbane')).toBe('2026-06-10');
		expect(plantToday('2026-06-09T22:30:00Z', 'Europe/Vienna')).toBe('2026-06-10');
		expect(plantToday('2026-06-09T22:30:00Z', 'UTC')).toBe('2026-06-09');
	});

	test('an unknown zone is refused and the plant keeps its zone', () => {
		setPlantZone('Europe/Vienna');
		expect(() => setPlantZone('Europe/Atlantis')).toThrow(RangeError);
		expect(plantZone()).toBe('Europe/Vienna');
	});

	test('the list offers UTC first and real IANA names', () => {
		const zones = listTimeZones();
		expect(zones[0]).toBe('UTC');
		expect(zones).toContain('Europe/Vienna');
		expect(zones).toContain('Australia/Brisbane');
	});
});

describe('date and time inputs are read as plant time', () => {
	test('datetime-local values: plant clock in, UTC instant out', () => {
		// 14:30 in Vienna in winter = 14:30 − 1:00 = 13:30 UTC; in summer 14:30 − 2:00 = 12:30 UTC.
		expect(readPlantDateTime('2026-01-15T14:30', 'Europe/Vienna')).toBe('2026-01-15T13:30:00.000Z');
		expect(readPlantDateTime('2026-07-15 14:30', 'Europe/Vienna')).toBe('2026-07-15T12:30:00.000Z');
		// 23:30 in Brisbane = 23:30 − 10:00 = 13:30 UTC the same day.
		expect(readPlantDateTime('2026-06-09T23:30:00', 'Australia/Brisbane')).toBe(
			'2026-06-09T13:30:00.000Z'
		);
	});

	test('an explicit Z or offset is taken as it says, whatever the plant zone', () => {
		expect(readPlantDateTime('2026-01-15T14:30Z', 'Europe/Vienna')).toBe(
			'2026-01-15T14:30:00.000Z'
		);
		expect(readPlantDateTime('2026-01-15T14:30+05:30', 'Europe/Vienna')).toBe(
			'2026-01-15T09:00:00.000Z'
		);
	});

	test('a time skipped by summer time, a 30 February or 24:00 is refused, not moved', () => {
		// 29 March 2026: Vienna clocks jump from 02:00 to 03:00.
		expect(readPlantDateTime('2026-03-29T02:30', 'Europe/Vienna')).toBeNull();
		expect(readPlantDateTime('2026-03-29T03:00', 'Europe/Vienna')).toBe('2026-03-29T01:00:00.000Z');
		expect(readPlantDateTime('2026-02-30T10:00', 'Europe/Vienna')).toBeNull();
		expect(readPlantDateTime('2026-02-01T24:00', 'Europe/Vienna')).toBeNull();
		expect(readPlantDateTime('2026-02-01T24:00Z', 'Europe/Vienna')).toBeNull();
		expect(readPlantDateTime('yesterday', 'Europe/Vienna')).toBeNull();
	});

	test('the hour repeated when summer time ends is read as the later (winter) one', () => {
		// 25 October 2026: 03:00 summer time becomes 02:00 winter time; 02:30 happens twice.
		// Winter time UTC+1: 02:30 − 1:00 = 01:30 UTC.
		expect(readPlantDateTime('2026-10-25T02:30', 'Europe/Vienna')).toBe('2026-10-25T01:30:00.000Z');
	});

	test('a form shows a stored instant back on the plant clock', () => {
		setPlantZone('Europe/Vienna');
		expect(toPlantInput('2026-07-15T12:30:00.000Z')).toBe('2026-07-15T14:30');
		expect(readPlantDateTime(toPlantInput('2026-01-15T13:30:00.000Z'))).toBe(
			'2026-01-15T13:30:00.000Z'
		);
	});
});

describe('plant days', () => {
	test('a plant day starts at plant midnight, also on the short and the long day', () => {
		// Vienna winter: midnight = 23:00 UTC the day before; summer: 22:00 UTC the day before.
		expect(plantDayStart('2026-01-15', 'Europe/Vienna')).toBe('2026-01-14T23:00:00.000Z');
		expect(plantDayStart('2026-03-29', 'Europe/Vienna')).toBe('2026-03-28T23:00:00.000Z');
		expect(plantDayStart('2026-03-30', 'Europe/Vienna')).toBe('2026-03-29T22:00:00.000Z');
		expect(plantDayStart('2026-06-10', 'Australia/Brisbane')).toBe('2026-06-09T14:00:00.000Z');
		// Noon in Brisbane = 12:00 − 10:00 = 02:00 UTC.
		expect(plantNoon('2026-06-10', 'Australia/Brisbane')).toBe('2026-06-10T02:00:00.000Z');
	});

	test('whole plant days between two instants count calendar dates', () => {
		// 23:00 UTC on 1 March (00:00 on 2 March in Vienna) to 01:00 UTC on 10 March (02:00 on the
		// 10th): UTC dates 1 → 10 = 9 days; Vienna dates 2 → 10 = 8 days.
		expect(plantDaysBetween('2026-03-01T23:00:00Z', '2026-03-10T01:00:00Z', 'UTC')).toBe(9);
		expect(plantDaysBetween('2026-03-01T23:00:00Z', '2026-03-10T01:00:00Z', 'Europe/Vienna')).toBe(
			8
		);
	});
});
