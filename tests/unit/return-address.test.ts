import { describe, expect, it } from 'vitest';
import { returnAddress } from '../../src/lib/server/auth/guard';

// Where sign-in sends someone back after their session ended: the page, never a form action's
// address (a GET of `?/inspect` would show the page under the action's name).
describe('returnAddress', () => {
	it('keeps a page address as it is', () => {
		expect(returnAddress(new URL('http://x/dies/D-0136/surface'))).toBe('/dies/D-0136/surface');
		expect(returnAddress(new URL('http://x/dies/D-0136/surface?job=TJ-00012'))).toBe(
			'/dies/D-0136/surface?job=TJ-00012'
		);
	});

	it('drops the action name of a form action and keeps the rest of the query', () => {
		expect(returnAddress(new URL('http://x/dies/D-0136/surface?/inspect'))).toBe(
			'/dies/D-0136/surface'
		);
		expect(returnAddress(new URL('http://x/dies/D-0136/surface?/inspect&job=TJ-00012'))).toBe(
			'/dies/D-0136/surface?job=TJ-00012'
		);
	});
});
