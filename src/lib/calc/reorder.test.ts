import { describe, expect, it } from 'vitest';
import { isReorderDue, reorderByDate } from './reorder';

describe('reorderByDate', () => {
	it('counts calendar days back from the projected end of life', () => {
		// By hand: 2027-03-15 back to 2027-02-15 is 28 days (2027 is not a leap year), back to
		// 2027-01-15 another 31 (59), back to 2026-12-15 another 31 (90). 84 days back is
		// therefore 6 days after 2026-12-15: 2026-12-21.
		expect(reorderByDate('2027-03-15', 84)).toBe('2026-12-21');
	});

	it('crosses a leap day', () => {
		// By hand: 2028 is a leap year; 2028-03-01 less 1 day is 2028-02-29, less 30 days is
		// 2028-01-31 (29 days of February + 1).
		expect(reorderByDate('2028-03-01', 1)).toBe('2028-02-29');
		expect(reorderByDate('2028-03-01', 30)).toBe('2028-01-31');
	});

	it('has no date without a projection and refuses a broken lead time', () => {
		expect(reorderByDate(null, 84)).toBeNull();
		expect(() => reorderByDate('2027-03-15', -1)).toThrow(RangeError);
		expect(() => reorderByDate('2027-03-15', 1.5)).toThrow(RangeError);
	});
});

describe('isReorderDue', () => {
	it('is due on and after the reorder-by date, not before', () => {
		expect(isReorderDue('2026-12-21', '2026-12-20')).toBe(false);
		expect(isReorderDue('2026-12-21', '2026-12-21')).toBe(true);
		expect(isReorderDue('2026-12-21', '2027-01-05')).toBe(true);
		expect(isReorderDue(null, '2027-01-05')).toBe(false);
	});
});
