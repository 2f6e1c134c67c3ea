import { stringify } from 'csv-stringify/sync';

/** A CSV download: UTF-8 with BOM (so spreadsheet programs read accents), CRLF, quoted as needed. */
export function csvResponse(filename: string, header: string[], rows: unknown[][]): Response {
	// Cells that a spreadsheet would run as a formula are prefixed with an apostrophe.
	const safe = rows.map((r) =>
		r.map((v) => (typeof v === 'string' && /^[=+\-@\t\r]/.test(v) ? `'${v}` : v))
	);
	const body = '\uFEFF' + stringify([header, ...safe], { record_delimiter: '\r\n' });
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${filename.replace(/[^\w.-]/g, '_')}"`
		}
	});
}
