import { describe, expect, test } from 'vitest';
import { monthsOfPeriod, repairCost, resolvePeriod, statementReference } from './statement-period';

// Calendar facts below are from the Gregorian calendar (ISO 8601): month lengths, 2028 is a leap
// year (divisible by 4), 2100 is not (a century not divisible by 400).
describe('statement periods', () => {
	test('a month runs from its first to its last day', () => {
		expect(resolvePeriod({ kind: 'month', year: 2026, month: 2 })).toEqual({
			kind: 'month',
			from: '2026-02-01',
			to: '2026-02-28',
			label: 'February 2026'
		});
		expect(resolvePeriod({ kind: 'month', year: 2028, month: 2 }).to).toBe('2028-02-29');
		expect(resolvePeriod({ kind: 'month', year: 2100, month: 2 }).to).toBe('2100-02-28');
		expect(resolvePeriod({ kind: 'month', year: 2026, month: 12 }).to).toBe('2026-12-31');
	});

	test('quarters are three calendar months', () => {
		expect(resolvePeriod({ kind: 'quarter', year: 2026, quarter: 1 })).toMatchObject({
			from: '2026-01-01',
			to: '2026-03-31',
			label: 'Q1 2026 (January–March)'
		});
		expect(resolvePeriod({ kind: 'quarter', year: 2026, quarter: 3 })).toMatchObject({
			from: '2026-07-01',
			to: '2026-09-30'
		});
		expect(resolvePeriod({ kind: 'quarter', year: 2026, quarter: 4 }).to).toBe('2026-12-31');
	});

	test('a year and custom dates', () => {
		expect(resolvePeriod({ kind: 'year', year: 2025 })).toMatchObject({
			from: '2025-01-01',
			to: '2025-12-31',
			label: '2025'
		});
		expect(resolvePeriod({ kind: 'custom', from: '2026-03-10', to: '2026-04-20' }).label).toBe(
			'10 March 2026 – 20 April 2026'
		);
	});

	test('impossible periods are refused with a reason', () => {
		expect(() => resolvePeriod({ kind: 'month', year: 2026, month: 13 })).toThrow(/1 to 12/);
		expect(() => resolvePeriod({ kind: 'quarter', year: 2026, quarter: 5 })).toThrow(/1 to 4/);
		expect(() => resolvePeriod({ kind: 'custom', from: '2026-02-30', to: '2026-03-01' })).toThrow(
			/not a date/
		);
		expect(() => resolvePeriod({ kind: 'custom', from: '2026-04-02', to: '2026-04-01' })).toThrow(
			/before the first day/
		);
	});

	test('a period is split into months, cut at both ends', () => {
		expect(monthsOfPeriod('2026-03-10', '2026-05-05')).toEqual([
			{ month: '2026-03', from: '2026-03-10', to: '2026-03-31', whole: false },
			{ month: '2026-04', from: '2026-04-01', to: '2026-04-30', whole: true },
			{ month: '2026-05', from: '2026-05-01', to: '2026-05-05', whole: false }
		]);
		expect(monthsOfPeriod('2025-12-01', '2026-01-31').map((m) => m.month)).toEqual([
			'2025-12',
			'2026-01'
		]);
		expect(monthsOfPeriod('2026-06-15', '2026-06-15')).toEqual([
			{ month: '2026-06', from: '2026-06-15', to: '2026-06-15', whole: false }
		]);
	});

	test('references carry the owner code, the issue day and a running number', () => {
		expect(statementReference('acme', '2026-07-01', 1)).toBe('ST-ACME-20260701-01');
		expect(statementReference('B-2', '2026-07-01', 12)).toBe('ST-B2-20260701-12');
		expect(() => statementReference('ACME', '2026-07-01', 0)).toThrow();
	});

	test('repair cost is hours times rate, to the cent', () => {
		// Hand calculation: 3.5 h × 62.40 = 218.40; 1.25 h × 47.90 = 59.875 → 59.88.
		expect(repairCost(3.5, 62.4)).toBe(218.4);
		expect(repairCost(1.25, 47.9)).toBe(59.88);
		expect(repairCost(null, 50)).toBeNull();
		expect(repairCost(2, null)).toBeNull();
	});
});
