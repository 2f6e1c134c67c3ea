// The one number reader, case by case. Expected values are written out by hand from the rules in
// src/lib/parse-number.ts (Castellan's own rules, common practice for mixed-locale input).
import { describe, expect, it } from 'vitest';
import { describeReading, parseTypedNumber } from '../../src/lib/parse-number';

const value = (typed: unknown, kind: 'whole' | 'decimal') => {
	const r = parseTypedNumber(typed, kind);
	return r.ok ? r.value : `refused: ${r.message}`;
};

describe('whole-number fields', () => {
	it.each([
		['312', 312],
		['  312 ', 312],
		['50 512', 50512],
		['50\u00a0512', 50512],
		['50,512', 50512],
		['1,250,000', 1250000],
		['-40', -40],
		['−40', -40],
		['+7', 7],
		['0', 0],
		['-0', 0],
		['', null],
		['   ', null],
		[null, null],
		[undefined, null],
		[42, 42]
	])('%j reads as %j', (typed, expected) => {
		expect(value(typed, 'whole')).toBe(expected);
	});

	it.each([
		['3.9', '“3.9” is not a whole number.'],
		['3.0', '“3.0” is not a whole number.'],
		['12abc', '“12abc” is not a number'],
		['2e1', '“2e1” is written as a power of ten'],
		['1e7', '“1e7” is written as a power of ten'],
		['1E7', '“1E7” is written as a power of ten'],
		['18,5', '“18,5” is not a whole number.'],
		['1.250', '“1.250” could be 1250 or 1.25'],
		['0x10', '“0x10” is not a number'],
		['Infinity', '“Infinity” is not a number'],
		['NaN', '“NaN” is not a number'],
		['5 05', 'spaces may only group digits in threes'],
		['1,25,000', 'more than one comma'],
		['12 345 678 901 234 567', 'more digits than Castellan can keep exactly'],
		['--5', 'is not a number']
	])('%j is refused: %s', (typed, message) => {
		expect(value(typed, 'whole')).toContain(message);
	});

	it('a non-whole number handed in as a number is refused too', () => {
		expect(value(3.9, 'whole')).toContain('is not a whole number');
		expect(value(Number.NaN, 'whole')).toContain('Enter a number');
	});
});

describe('decimal fields', () => {
	it.each([
		['18.5', 18.5],
		['18,5', 18.5],
		['0,125', 0.125],
		['.5', 0.5],
		[',5', 0.5],
		['3.9', 3.9],
		['1.250', 1.25],
		['1,250.5', 1250.5],
		['1.250,5', 1250.5],
		['1.250.000,5', 1250000.5],
		['12 500,75', 12500.75],
		['-3,5', -3.5],
		['1,2345', 1.2345]
	])('%j reads as %j', (typed, expected) => {
		expect(value(typed, 'decimal')).toBe(expected);
	});

	it.each([
		['1,250', '“1,250” could be 1250 or 1.25'],
		['12abc', 'is not a number'],
		['2e1', 'power of ten'],
		['1.5e3', 'power of ten'],
		['1,5e3', 'power of ten'],
		['1.2.3', 'more than one point'],
		['1,250,5', 'more than one comma'],
		['1,250.000,5', 'mixes commas and points'],
		['12,50.5', 'mixes commas and points'],
		['18,5 L/min', 'is not a number']
	])('%j is refused: %s', (typed, message) => {
		expect(value(typed, 'decimal')).toContain(message);
	});
});

describe('how a value was read', () => {
	it('names the value and the unit', () => {
		expect(describeReading('18,5', 'decimal', 'L/min')).toBe('read as 18.5 L/min');
		expect(describeReading('50 512', 'whole')).toBe('read as 50512');
	});
	it('says nothing for blank or refused input', () => {
		expect(describeReading('', 'decimal', 'L/min')).toBeNull();
		expect(describeReading('1e7', 'whole')).toBeNull();
	});
});
