import { describe, expect, it } from 'vitest';
import { readImportDate, readImportNumber } from '../../src/lib/server/import/read-value';

describe('import cell readers (strict)', () => {
	it('reads plain numbers and refuses commas, separators, units and fractions in whole columns', () => {
		expect(readImportNumber('412.5', false)).toEqual({ ok: true, value: 412.5 });
		expect(readImportNumber(48200, true)).toEqual({ ok: true, value: 48200 });
		expect(readImportNumber(' 125000 ', true)).toEqual({ ok: true, value: 125000 });
		expect(readImportNumber('12,5', true)).toMatchObject({
			ok: false,
			message: expect.stringContaining('write 12.5')
		});
		expect(readImportNumber('1,200', true)).toMatchObject({
			ok: false,
			message: expect.stringContaining('or 1200 if the comma separates thousands')
		});
		expect(readImportNumber('1.200.000', true)).toMatchObject({
			ok: false,
			message: expect.stringContaining('write 1200000')
		});
		expect(readImportNumber('350 cm2', false)).toMatchObject({
			ok: false,
			message: expect.stringContaining('unit')
		});
		expect(readImportNumber('2.5', true)).toMatchObject({
			ok: false,
			message: expect.stringContaining('whole')
		});
		expect(readImportNumber(2.5, true)).toMatchObject({ ok: false });
		expect(readImportNumber('abc', false)).toMatchObject({ ok: false });
	});

	it('reads ISO days and date cells; refuses day-first and month-first text, offering a certain reading', () => {
		expect(readImportDate('2024-02-29')).toEqual({ ok: true, value: '2024-02-29' });
		expect(readImportDate('2023-02-29')).toMatchObject({ ok: false });
		expect(readImportDate('2024-03-14')).toEqual({ ok: true, value: '2024-03-14' });
		expect(readImportDate('14.03.2024')).toEqual({
			ok: false,
			message: 'Write 14.03.2024 as 2024-03-14 (YYYY-MM-DD).'
		});
		expect(readImportDate('12/25/2024')).toEqual({
			ok: false,
			message: 'Write 12/25/2024 as 2024-12-25 (YYYY-MM-DD).'
		});
		expect(readImportDate('03/04/2024')).toMatchObject({
			ok: false,
			message: expect.stringContaining('could be 2024-04-03 or 2024-03-04')
		});
		expect(readImportDate(45365)).toMatchObject({
			ok: false,
			message: expect.stringContaining('plain number')
		});
		expect(readImportDate(new Date(Date.UTC(2024, 2, 14)))).toEqual({
			ok: true,
			value: '2024-03-14'
		});
	});
});
