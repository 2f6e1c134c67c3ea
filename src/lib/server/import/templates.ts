import ExcelJS from 'exceljs';
import { stringify } from 'csv-stringify/sync';
import {
	IMPORT_FIELDS,
	IMPORT_KIND_LABELS,
	IMPORT_KINDS,
	type ImportKind
} from '../../import-fields';

/** The example rows of the templates: die D-0101 of the demo plant, as a plant would type it. */
export const TEMPLATE_EXAMPLE: Record<ImportKind, Record<string, string | number>[]> = {
	dies: [
		{
			number: 'D-0101',
			part_name: 'Impeller housing',
			part_number: 'BRK-4000',
			owner: 'BRKPUMP',
			alloy: 'A380',
			process: 'cold_chamber',
			cavities: 2,
			projected_area_cm2: 412.5,
			has_slides: 'no',
			location: 'Rack B-2',
			notes: '',
			expected_life_shots: '',
			opening_shots: 48200,
			steel: 'H13',
			cover_serial: 'D-0101-C1',
			cover_installed: '2025-02-03',
			ejector_serial: 'D-0101-E1',
			ejector_installed: '2025-02-03'
		}
	],
	halves: [
		{
			die: 'D-0101',
			side: 'cover',
			serial: 'D-0101-C1',
			steel: 'H13',
			hardness_hrc: 46,
			installed: '2025-02-03',
			removed: '',
			half_shots: '',
			removal_reason: ''
		}
	],
	service: [
		{
			die: 'D-0101',
			task: 'stress_relief',
			last_done: '2025-11-20',
			last_done_shots: 41000,
			interval_shots: '',
			interval_days: ''
		}
	]
};

const headerOf = (kind: ImportKind) => IMPORT_FIELDS[kind].map((f) => f.key);
const exampleOf = (kind: ImportKind) =>
	TEMPLATE_EXAMPLE[kind].map((row) => headerOf(kind).map((k) => row[k] ?? ''));

/** The dies template as CSV (UTF-8 with BOM): header row and the example row. */
export function dieTemplateCsv(): string {
	return (
		'\uFEFF' + stringify([headerOf('dies'), ...exampleOf('dies')], { record_delimiter: '\r\n' })
	);
}

/** The workbook template: Dies, Halves and Service tasks sheets, and an Explanation sheet. */
export async function dieTemplateXlsx(): Promise<Uint8Array> {
	const book = new ExcelJS.Workbook();
	book.creator = 'Castellan';
	for (const kind of IMPORT_KINDS) {
		const ws = book.addWorksheet(IMPORT_KIND_LABELS[kind]);
		ws.addRow(headerOf(kind)).font = { bold: true };
		for (const row of exampleOf(kind)) ws.addRow(row);
		ws.columns.forEach((c) => (c.width = 18));
	}
	const help = book.addWorksheet('Explanation');
	help.addRow(['Sheet', 'Column', 'Meaning', 'Required', 'Units and allowed values']).font = {
		bold: true
	};
	for (const kind of IMPORT_KINDS) {
		for (const f of IMPORT_FIELDS[kind]) {
			help.addRow([IMPORT_KIND_LABELS[kind], f.key, f.label, f.required ? 'yes' : 'no', f.help]);
		}
	}
	help.addRow([]);
	help.addRow([
		'',
		'',
		'Numbers: digits with a point for decimals, no thousands separators and no units in the cell. Dates: YYYY-MM-DD or a date cell. Replace the example rows with your own. Formulas are not evaluated: their saved value is read.'
	]);
	help.addRow([
		'',
		'',
		'A new die gets the service plan of its alloy family; without a Service tasks row a task counts from the import day at 0 shots.'
	]);
	help.columns.forEach((c, i) => (c.width = [14, 22, 26, 10, 90][i]));
	return new Uint8Array(await book.xlsx.writeBuffer());
}
