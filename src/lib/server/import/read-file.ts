import ExcelJS from 'exceljs';
import { parse } from 'csv-parse/sync';
import { IMPORT_KINDS, IMPORT_KIND_LABELS, type ImportKind } from '../../import-fields';
import type { Cell } from './read-value';

/** Largest file the import takes; a bigger one is refused before it is read. */
export const MAX_IMPORT_BYTES = 20 * 1024 * 1024;
export const MAX_IMPORT_ROWS = 100_000;

export interface ImportSheet {
	name: string;
	kind: ImportKind;
	headers: string[];
	rows: Cell[][];
}

export type ReadResult = { ok: true; sheets: ImportSheet[] } | { ok: false; message: string };

export function tooLargeMessage(bytes: number): string {
	return `The file has ${(bytes / 1024 / 1024).toFixed(1)} MB; the import takes files up to 20 MB. Split the register into several files (by owner, say) and import them one after the other.`;
}

function kindOfSheet(name: string): ImportKind | null {
	const n = name.trim().toLowerCase();
	for (const kind of IMPORT_KINDS) {
		if (n === kind || n === IMPORT_KIND_LABELS[kind].toLowerCase()) return kind;
	}
	if (n === 'service') return 'service';
	return null;
}

/** Drops blank trailing rows and checks the header row. */
function finishSheet(name: string, kind: ImportKind, table: Cell[][]): ImportSheet | string {
	const [head, ...body] = table;
	if (!head) return `The ${name} sheet is empty.`;
	const headers = head.map((h) => (h === null ? '' : String(h).trim()));
	const seen = new Set<string>();
	for (const h of headers) {
		if (!h) continue;
		if (seen.has(h.toLowerCase())) return `The ${name} sheet has the column "${h}" twice.`;
		seen.add(h.toLowerCase());
	}
	const rows = body.filter((r) => r.some((c) => c !== null && String(c).trim() !== ''));
	if (rows.length > MAX_IMPORT_ROWS) {
		return `The ${name} sheet has ${rows.length} rows; the import takes up to ${MAX_IMPORT_ROWS}.`;
	}
	return { name, kind, headers, rows };
}

function readCsv(bytes: Uint8Array, kind: ImportKind): ReadResult {
	let text: string;
	try {
		text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		return {
			ok: false,
			message: 'The file is not UTF-8 text. Save it as "CSV UTF-8" and try again.'
		};
	}
	let records: string[][];
	try {
		records = parse(text.replace(/^\uFEFF/, ''), {
			relax_column_count: true,
			skip_empty_lines: true
		}) as string[][];
	} catch (e) {
		return { ok: false, message: `The CSV cannot be read: ${(e as Error).message}` };
	}
	const sheet = finishSheet(
		IMPORT_KIND_LABELS[kind],
		kind,
		records.map((r) => r.map((c) => c))
	);
	return typeof sheet === 'string' ? { ok: false, message: sheet } : { ok: true, sheets: [sheet] };
}

/** A workbook cell as text, number or day; formulas give their stored result, never evaluated. */
function workbookCell(value: ExcelJS.CellValue): Cell | { problem: string } {
	if (value === null || value === undefined) return null;
	if (typeof value === 'number' || typeof value === 'string') return value;
	if (typeof value === 'boolean') return value ? 'yes' : 'no';
	if (value instanceof Date) return value.toISOString().slice(0, 10);
	if (typeof value === 'object') {
		if ('formula' in value || 'sharedFormula' in value) {
			const result = (value as { result?: ExcelJS.CellValue }).result;
			if (result === undefined || result === null || typeof result === 'object') {
				if (result instanceof Date) return result.toISOString().slice(0, 10);
				return '#FORMULA';
			}
			return workbookCell(result);
		}
		if ('richText' in value) return value.richText.map((t) => t.text).join('');
		if ('text' in value) return String(value.text);
		if ('error' in value) return String(value.error);
	}
	return String(value);
}

async function readXlsx(bytes: Uint8Array): Promise<ReadResult> {
	const book = new ExcelJS.Workbook();
	try {
		await book.xlsx.load(
			bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer
		);
	} catch {
		return {
			ok: false,
			message: 'The workbook cannot be read. Save it as an Excel workbook (.xlsx) and try again.'
		};
	}
	const sheets: ImportSheet[] = [];
	const named = book.worksheets.filter((w) => kindOfSheet(w.name));
	// A workbook of one unnamed sheet is read as the die list.
	const chosen = named.length ? named : book.worksheets.slice(0, 1);
	for (const ws of chosen) {
		const kind = kindOfSheet(ws.name) ?? 'dies';
		if (sheets.some((s) => s.kind === kind)) {
			return { ok: false, message: `The workbook has two ${IMPORT_KIND_LABELS[kind]} sheets.` };
		}
		const width = ws.columnCount;
		const table: Cell[][] = [];
		ws.eachRow({ includeEmpty: true }, (row, rowNumber) => {
			const cells: Cell[] = [];
			for (let c = 1; c <= width; c++) {
				const v = workbookCell(row.getCell(c).value);
				cells.push(typeof v === 'object' && v !== null ? null : v);
			}
			table[rowNumber - 1] = cells;
		});
		for (let i = 0; i < table.length; i++) table[i] ??= [];
		const sheet = finishSheet(ws.name, kind, table);
		if (typeof sheet === 'string') return { ok: false, message: sheet };
		sheets.push(sheet);
	}
	if (!sheets.length) return { ok: false, message: 'The workbook has no sheets.' };
	return { ok: true, sheets };
}

/**
 * Reads an uploaded register: a workbook (.xlsx: sheets Dies, Halves, Service tasks; others
 * ignored) or one CSV file holding `csvKind`. Refuses files over 20 MB before reading them.
 */
export async function readImportFile(
	bytes: Uint8Array,
	fileName: string,
	csvKind: ImportKind = 'dies'
): Promise<ReadResult> {
	if (bytes.byteLength > MAX_IMPORT_BYTES)
		return { ok: false, message: tooLargeMessage(bytes.byteLength) };
	if (bytes.byteLength === 0) return { ok: false, message: 'The file is empty.' };
	const isZip = bytes[0] === 0x50 && bytes[1] === 0x4b;
	if (/\.xlsx$/i.test(fileName) || isZip) {
		if (!isZip) return { ok: false, message: 'This .xlsx file is not an Excel workbook.' };
		return readXlsx(bytes);
	}
	if (/\.(xls|xlsm|xlsb|ods)$/i.test(fileName)) {
		return { ok: false, message: 'Save the workbook as .xlsx (without macros) or as CSV UTF-8.' };
	}
	return readCsv(bytes, csvKind);
}
