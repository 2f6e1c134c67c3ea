import { stringify } from 'csv-stringify/sync';

/** A cell that a spreadsheet would run as a formula starts with one of these. */
const FORMULA_START = /^[=+\-@\t\r]/;
/** The same trigger at the start of a physical line inside a cell (after CR or LF). */
const FORMULA_AFTER_BREAK = /([\r\n])([=+\-@\t])/g;

/** A cell made inert for spreadsheets: a formula trigger at the start of any line gets an apostrophe. */
export function defuseCsvCell(value: unknown): unknown {
	if (typeof value !== 'string') return value;
	const start = FORMULA_START.test(value) ? `'${value}` : value;
	return start.replace(FORMULA_AFTER_BREAK, "$1'$2");
}

/**
 * The CSV text of every download: UTF-8 with BOM (so spreadsheet programs read accents), CRLF
 * records, and every cell holding CR, LF, `;`, `,` or `"` quoted (csv-stringify alone leaves a bare
 * LF unquoted when the record delimiter is CRLF, and `;` is the separator of many European locales).
 */
export function formatCsv(header: string[], rows: unknown[][]): string {
	const safe = rows.map((r) => r.map(defuseCsvCell));
	return (
		'\uFEFF' + stringify([header, ...safe], { record_delimiter: '\r\n', quoted_match: /[\r\n;,"]/ })
	);
}

/** A CSV download built by `formatCsv`. */
export function csvResponse(filename: string, header: string[], rows: unknown[][]): Response {
	return new Response(formatCsv(header, rows), {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${filename.replace(/[^\w.-]/g, '_')}"`,
			'cache-control': 'private, no-store'
		}
	});
}
