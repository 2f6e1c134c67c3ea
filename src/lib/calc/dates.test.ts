import { describe, expect, test } from 'vitest';
import { addDaysToDate, isoDateOf, parseInstant, projectDate } from './dates';

describe('dates (UTC calendar arithmetic)', () => {
	test('a bare date stands for the end of that day', () => {
		expect(parseInstant('2024-04-30')).toBe(Date.parse('2024-05-01T00:00:00Z'));
		expect(parseInstant('2024-04-30T12:00:00Z')).toBe(Date.UTC(2024, 3, 30, 12));
	});

	test('isoDateOf keeps a bare date and takes the UTC date of a timestamp', () => {
		expect(isoDateOf('2024-04-30')).toBe('2024-04-30');
		expect(isoDateOf('2024-04-30T23:59:59Z')).toBe('2024-04-30');
		expect(isoDateOf('2024-05-01T01:00:00+02:00')).toBe('2024-04-30');
	});

	test('adding days crosses month and leap-day boundaries (Gregorian calendar)', () => {
		expect(addDaysToDate('2024-02-28', 1)).toBe('2024-02-29');
		expect(addDaysToDate('2023-02-28', 1)).toBe('2023-03-01');
		expect(addDaysToDate('2024-12-31T18:00:00Z', 1)).toBe('2025-01-01');
	});

	test('projectDate rounds up and gives null past year 9999', () => {
		expect(projectDate('2024-01-01', 0.2)).toBe('2024-01-02');
		expect(projectDate('2024-01-01', 1e9)).toBeNull();
		expect(projectDate('2024-01-01', Number.POSITIVE_INFINITY)).toBeNull();
	});

	test('rejects text that is not a date', () => {
		expect(() => parseInstant('yesterday')).toThrow(RangeError);
	});
});
