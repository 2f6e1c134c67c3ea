// Issue 14, item 7: booking dates go through the ledger's calendar check and a plausible window.
import { describe, expect, test } from 'vitest';
import { bookingApiSchema } from '../../src/lib/schemas/schedule';
import { calendarFieldsValid } from '../../src/lib/calc/dates';

const day = (offset: number) =>
	new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);
const booking = (startsAt: string, endsAt: string) => ({
	die: 'D-0101',
	press: 'P-1',
	startsAt,
	endsAt,
	orderRef: 'SO-1',
	parts: 100
});

describe('item 7: booking dates', () => {
	test.each([
		['0000-01-01T06:00', '0000-01-02T06:00'],
		['1970-01-01T06:00', '1970-01-02T06:00'],
		['9999-12-30T06:00', '9999-12-31T06:00']
	])('%s is refused with a field message on the start', (start, end) => {
		const parsed = bookingApiSchema.safeParse(booking(start, end));
		expect(parsed.success).toBe(false);
		expect(parsed.error?.issues.map((i) => i.path.join('.'))).toContain('startsAt');
	});

	test('30 February is refused, not stored as 2 March', () => {
		const parsed = bookingApiSchema.safeParse(booking('2027-02-30T06:00', '2027-03-02T06:00'));
		expect(parsed.success).toBe(false);
		expect(parsed.error?.issues[0].path).toEqual(['startsAt']);
		expect(parsed.error?.issues[0].message).toMatch(/date and time/);
	});

	test('29 February of a leap year and a booking next week pass', () => {
		// 2028 is a leap year (divisible by 4, not a century); 2027 is not.
		expect(calendarFieldsValid('2028-02-29')).toBe(true);
		expect(calendarFieldsValid('2027-02-29')).toBe(false);
		expect(calendarFieldsValid('2100-02-29')).toBe(false);
		expect(calendarFieldsValid('2000-02-29')).toBe(true);
		const parsed = bookingApiSchema.safeParse(booking(`${day(7)}T06:00`, `${day(8)}T06:00`));
		expect(parsed.success).toBe(true);
	});
});
