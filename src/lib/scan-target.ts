import { normaliseDieNumber } from './calc/die-number';

/**
 * Where a scanned code leads: the die page for a Castellan label (its QR holds
 * `<origin>/dies/D-0138`), or for a bare die number. Null for anything else; a code is never
 * followed off this site.
 */
export function dieHrefFromScan(text: string): string | null {
	const t = text.trim();
	let path: string;
	try {
		path = new URL(t).pathname;
	} catch {
		const n = normaliseDieNumber(t);
		return n ? `/dies/${n}` : null;
	}
	// Only the path is used, so the phone stays on this site even when the label was printed
	// with another address of the same plant (ORIGIN behind a proxy).
	const m = /^\/dies\/([A-Za-z0-9-]{2,20})\/?$/.exec(path);
	return m ? `/dies/${decodeURIComponent(m[1]).toUpperCase()}` : null;
}
