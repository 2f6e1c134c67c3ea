import { describe, expect, test } from 'vitest';
import { checkOrder } from './order-check';

// Plain arithmetic (DESIGN.md "Order check"); expected values worked by hand in the comments.
describe('checkOrder', () => {
	const base = {
		parts: 1000,
		cavities: 4,
		scrapPct: 5,
		shotsPerHour: 120,
		shotsToNextService: null,
		shotsToEndOfLife: 100_000
	};

	test('1000 parts, 4 cavities, 5 % scrap: 1000 / 3.8 = 263.2 → 264 shots, 2.2 h at 120/h', () => {
		const result = checkOrder(base);
		expect(result.shotsNeeded).toBe(264);
		expect(result.pressHours).toBeCloseTo(2.2, 12);
		expect(result).toMatchObject({ fits: true, blockedBy: null, shotsShort: 0 });
	});

	test('an exact quotient adds no extra shot: 95 parts at 5 % scrap → 100 shots', () => {
		expect(checkOrder({ ...base, parts: 95, cavities: 1 }).shotsNeeded).toBe(100);
		expect(checkOrder({ ...base, parts: 1200, cavities: 4, scrapPct: 0 }).shotsNeeded).toBe(300);
		expect(checkOrder({ ...base, parts: 1201, cavities: 4, scrapPct: 0 }).shotsNeeded).toBe(301);
	});

	test('the next service blocks first: 264 needed, 200 to service → 64 short', () => {
		expect(checkOrder({ ...base, shotsToNextService: 200 })).toMatchObject({
			fits: false,
			blockedBy: 'service',
			shotsShort: 64
		});
	});

	test('end of life blocks first when it is the smaller limit', () => {
		expect(checkOrder({ ...base, shotsToNextService: 250, shotsToEndOfLife: 150 })).toMatchObject({
			fits: false,
			blockedBy: 'end_of_life',
			shotsShort: 114
		});
	});

	test('a run that ends exactly at the limit fits', () => {
		expect(checkOrder({ ...base, shotsToNextService: 264 }).fits).toBe(true);
		expect(checkOrder({ ...base, shotsToNextService: 263 }).shotsShort).toBe(1);
	});

	test('a limit already passed counts as 0 shots', () => {
		expect(checkOrder({ ...base, shotsToNextService: -500 })).toMatchObject({
			blockedBy: 'service',
			shotsShort: 264
		});
	});

	test('with no limits at all the order fits', () => {
		expect(checkOrder({ ...base, shotsToEndOfLife: null }).fits).toBe(true);
	});

	test.each([
		[{ parts: 0 }, /Parts/],
		[{ parts: 10.5 }, /Parts/],
		[{ cavities: 0 }, /Cavities/],
		[{ scrapPct: -1 }, /Scrap/],
		[{ scrapPct: 100 }, /Scrap/],
		[{ shotsPerHour: 0 }, /Shots per hour/]
	])('rejects %o', (change, message) => {
		expect(() => checkOrder({ ...base, ...change })).toThrow(RangeError);
		expect(() => checkOrder({ ...base, ...change })).toThrow(message);
	});
});
