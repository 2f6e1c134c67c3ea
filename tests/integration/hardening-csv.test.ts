// Issue 14, item 3: cells with line breaks, ';', ',' or '"' are quoted, and a formula trigger after a
// line break inside a cell is defused like one at its start. Expected texts written out by hand.
import { describe, expect, test } from 'vitest';
import { parse } from 'csv-parse/sync';
import { csvResponse, formatCsv } from '../../src/lib/server/csv';

describe('formatCsv', () => {
	test('a bare LF, CR, semicolon, comma and quote each get quotes', () => {
		const csv = formatCsv(
			['part', 'n'],
			[
				['a\nb', 1],
				['a;b', 2],
				['a,b', 3],
				['a"b', 4],
				['a\rb', 5]
			]
		);
		expect(csv).toBe('\uFEFFpart,n\r\n"a\nb",1\r\n"a;b",2\r\n"a,b",3\r\n"a""b",4\r\n"a\rb",5\r\n');
	});

	test('a formula after a line break gets the apostrophe as one at the start does', () => {
		const csv = formatCsv(
			['part'],
			[['a\n=1+1'], ['=HYPERLINK("x")'], ['x\r\n+1'], ['y\n-2\n@A1']]
		);
		expect(csv).toBe(
			'\uFEFFpart\r\n"a\n\'=1+1"\r\n"\'=HYPERLINK(""x"")"\r\n"x\r\n\'+1"\r\n"y\n\'-2\n\'@A1"\r\n'
		);
		// No physical line of the file starts with a trigger.
		for (const line of csv.slice(1).split(/\r\n|\r|\n/)) expect(line).not.toMatch(/^[=+\-@]/);
	});

	test('a CSV reader gets the original cells back (with the apostrophes) and one row per record', () => {
		const rows = [
			['a\n=1+1', 'x;y'],
			['plain', 'q"q']
		];
		const back = parse(formatCsv(['a', 'b'], rows), { bom: true, relax_column_count: false });
		expect(back).toEqual([
			['a', 'b'],
			["a\n'=1+1", 'x;y'],
			['plain', 'q"q']
		]);
	});

	test('plain cells and numbers stay unquoted; empty cells stay empty', () => {
		expect(formatCsv(['a', 'b', 'c'], [['D-0101', 12.5, null]])).toBe(
			'\uFEFFa,b,c\r\nD-0101,12.5,\r\n'
		);
	});

	test('the download says private, no-store (item 14)', () => {
		const res = csvResponse('x.csv', ['a'], [['1']]);
		expect(res.headers.get('cache-control')).toBe('private, no-store');
	});
});
