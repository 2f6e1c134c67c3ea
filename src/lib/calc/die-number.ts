/**
 * Reading die numbers the way people type them at the bench.
 *
 * The register's numbers are `D-` and four digits (`D-0138`). People type `D0138`, `d 138`,
 * `138`, `D-138` or `0138`; each of those means D-0138. Anything that is not a bare die number
 * (a part number, a part name) is left to the text search.
 */

const DIE_NUMBER_TYPED = /^D?[\s\-_.]*0*(\d{1,6})$/;

/** The canonical die number (`D-0138`) for what was typed, or null when it is not a die number. */
export function normaliseDieNumber(typed: string): string | null {
	const t = typed.trim().toUpperCase();
	const m = DIE_NUMBER_TYPED.exec(t);
	if (!m) return null;
	const digits = m[1];
	if (Number(digits) === 0) return null;
	return `D-${digits.padStart(4, '0')}`;
}

/** Letters and digits only, upper case: `brk 4259`, `BRK-4259` and `brk4259` compare equal. */
export function compactCode(typed: string): string {
	return typed.toUpperCase().replace(/[^A-Z0-9]/g, '');
}
