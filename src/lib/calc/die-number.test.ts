import { describe, expect, it } from 'vitest';
import { compactCode, normaliseDieNumber } from './die-number';

// Expected values are the spellings listed in issue 13 ("D0138, d 138, 138, D-138, D 138") and the
// register's own format D-NNNN (DESIGN.md, "dies (number `D-0147` …)").
describe('normaliseDieNumber', () => {
	it.each([
		['D-0138', 'D-0138'],
		['D0138', 'D-0138'],
		['d 138', 'D-0138'],
		['138', 'D-0138'],
		['0138', 'D-0138'],
		['D-138', 'D-0138'],
		['D 138', 'D-0138'],
		['  d-0138  ', 'D-0138'],
		['D7', 'D-0007'],
		['12345', 'D-12345']
	])('%s → %s', (typed, expected) => {
		expect(normaliseDieNumber(typed)).toBe(expected);
	});

	it.each(['', 'D', 'D-', '0', 'D-0000', 'BRK-4259', 'impeller', '13a', 'D-01-38', '1234567'])(
		'%s is not a die number',
		(typed) => {
			expect(normaliseDieNumber(typed)).toBeNull();
		}
	);
});

describe('compactCode', () => {
	it('drops case, spaces and dashes so part numbers compare as typed', () => {
		expect(compactCode('brk 4259')).toBe('BRK4259');
		expect(compactCode('BRK-4259')).toBe('BRK4259');
		expect(compactCode(' Brk_42-59 ')).toBe('BRK4259');
	});
});
