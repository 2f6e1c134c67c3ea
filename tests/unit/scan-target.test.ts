import { describe, expect, it } from 'vitest';
import { dieHrefFromScan } from '../../src/lib/scan-target';

// The die label's QR code holds `<ORIGIN>/dies/<number>` (src/routes/dies/[number]/label).
describe('dieHrefFromScan', () => {
	it('opens the die named by a label code, staying on this site', () => {
		expect(dieHrefFromScan('https://castellan.example.test/dies/D-0138')).toBe('/dies/D-0138');
		expect(dieHrefFromScan('http://10.0.0.5:3000/dies/D-0138/')).toBe('/dies/D-0138');
	});
	it('reads a bare die number as typed', () => {
		expect(dieHrefFromScan('d 138')).toBe('/dies/D-0138');
	});
	it('follows nothing else', () => {
		expect(dieHrefFromScan('https://evil.example/phish')).toBeNull();
		expect(dieHrefFromScan('https://x.test/dies/D-0138/edit')).toBeNull();
		expect(dieHrefFromScan('javascript:alert(1)')).toBeNull();
		expect(dieHrefFromScan('hello')).toBeNull();
	});
});
