// The zone look-ups are remembered (the board asks for the same instants thousands of times); the
// answers must stay those of the zone rules whatever form the instant is given in.
import { describe, expect, test } from 'vitest';
import { dateTimeInZone, startOfDayInZone, zonedFields } from '../../src/lib/calc/zone';

describe('remembered zone look-ups', () => {
	test('the same answer for a string, a number and a Date, across the spring change', () => {
		// EU summer time starts on the last Sunday of March at 01:00 UTC (Directive 2000/84/EC):
		// 28 March 2027. Vienna is UTC+1 before, UTC+2 after.
		const before = '2027-03-28T00:30:00.000Z';
		const after = '2027-03-28T01:30:00.000Z';
		for (let round = 0; round < 2; round++) {
			expect(dateTimeInZone(before, 'Europe/Vienna')).toBe('2027-03-28 01:30');
			expect(dateTimeInZone(Date.parse(before), 'Europe/Vienna')).toBe('2027-03-28 01:30');
			expect(dateTimeInZone(new Date(after), 'Europe/Vienna')).toBe('2027-03-28 03:30');
			expect(dateTimeInZone(after, 'UTC')).toBe('2027-03-28 01:30');
		}
	});

	test('a caller changing the fields it got does not change the next answer', () => {
		const first = zonedFields('2027-06-01T10:00:00.000Z', 'Europe/Vienna');
		first.hour = 99;
		expect(zonedFields('2027-06-01T10:00:00.000Z', 'Europe/Vienna').hour).toBe(12);
	});

	test('plant midnight is remembered per zone', () => {
		// Vienna on 1 July (UTC+2): midnight is 22:00 UTC the day before.
		expect(new Date(startOfDayInZone('2027-07-01', 'Europe/Vienna')).toISOString()).toBe(
			'2027-06-30T22:00:00.000Z'
		);
		expect(new Date(startOfDayInZone('2027-07-01', 'UTC')).toISOString()).toBe(
			'2027-07-01T00:00:00.000Z'
		);
		expect(new Date(startOfDayInZone('2027-07-01', 'Europe/Vienna')).toISOString()).toBe(
			'2027-06-30T22:00:00.000Z'
		);
	});
});
