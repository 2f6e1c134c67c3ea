import { createHash } from 'node:crypto';
import { parse } from 'csv-parse/sync';
import { parseTypedNumber } from '../../parse-number';
import { plantZone } from '../../plant-time';
import type { DB } from '../db/connect';
import {
	MAX_BATCH,
	normalizeInstant,
	recordShots,
	type LedgerActor,
	type ShotInput
} from './ledger';

export const MAX_CSV_BYTES = 2_000_000;
export const MAX_CSV_ROWS = MAX_BATCH;

/** The columns the upload reads, as documented on the page. */
export const CSV_COLUMNS = [
	'die',
	'counted_at',
	'shots',
	'counter_start',
	'counter_end',
	'press',
	'key',
	'note',
	'reset_reason'
] as const;
type Column = (typeof CSV_COLUMNS)[number];
const ALIASES: Record<string, Column> = { machine: 'press', countedat: 'counted_at' };

/** One data row of the file, read but not yet judged by the ledger. */
export interface CsvShotRow {
	/** Line in the file (header is line 1). */
	line: number;
	die: string;
	countedAt: string;
	shots: string;
	counterStart: string;
	counterEnd: string;
	press: string;
	key: string;
	note: string;
	resetReason: string;
	/** What the ledger gets, or why the row could not even be read. */
	input: ShotInput | null;
	problem: { column: string; message: string } | null;
}

export type ParsedCsv =
	| { ok: true; delimiter: ',' | ';'; rows: CsvShotRow[]; ignoredColumns: string[] }
	| { ok: false; message: string };

/** confirm: plausibility warnings; counted only with the uploader's confirm reason. */
export type RowStatus = 'valid' | 'duplicate' | 'confirm' | 'wrong';
export interface PreviewRow extends Omit<CsvShotRow, 'input' | 'problem'> {
	status: RowStatus;
	column: string | null;
	reason: string | null;
}
export interface CsvPreview {
	delimiter: ',' | ';';
	ignoredColumns: string[];
	rows: PreviewRow[];
	valid: number;
	duplicates: number;
	/** Rows that need a confirm reason to be counted. */
	confirm: number;
	wrong: number;
	/** Shots the valid rows add. */
	shots: number;
}

const DUPLICATE_REASON = 'Already counted (same row key); not counted again.';

const LEDGER_TO_COLUMN: Record<string, string> = {
	die: 'die',
	shots: 'shots',
	counterStart: 'counter_start',
	counterEnd: 'counter_end',
	countedAt: 'counted_at',
	machine: 'press',
	key: 'key',
	note: 'note',
	resetReason: 'reset_reason'
};

/** Picks the delimiter from the header line: semicolon files come from spreadsheet locales. */
function detectDelimiter(text: string): ',' | ';' {
	const header = text.slice(0, text.search(/\r?\n|$/));
	const count = (c: string) => header.split(c).length - 1;
	return count(';') > count(',') ? ';' : ',';
}

/** A number cell, read by the one parser every form uses (`3.9`, `12abc`, `1e7` are refused). */
function wholeNumber(cell: string): number | null | 'bad' {
	const read = parseTypedNumber(cell, 'whole');
	return !read.ok ? 'bad' : read.value;
}

/**
 * The row key when the file has none: the same reading (die, time, count, counters, press)
 * always gives the same key, so uploading a file twice counts nothing twice.
 */
export function deriveRowKey(r: {
	die: string;
	countedAt: string;
	shots: number;
	counterStart: number | null;
	counterEnd: number | null;
	press: string;
}): string {
	const text = [
		r.die.toUpperCase(),
		r.countedAt,
		r.shots,
		r.counterStart ?? '',
		r.counterEnd ?? '',
		r.press.toUpperCase()
	].join('|');
	return `csv:${createHash('sha256').update(text).digest('hex').slice(0, 32)}`;
}

function readRow(cells: Record<Column, string>, line: number, zone: string): CsvShotRow {
	const row: CsvShotRow = {
		line,
		die: cells.die.toUpperCase(),
		countedAt: cells.counted_at,
		shots: cells.shots,
		counterStart: cells.counter_start,
		counterEnd: cells.counter_end,
		press: cells.press,
		key: cells.key,
		note: cells.note,
		resetReason: cells.reset_reason ?? '',
		input: null,
		problem: null
	};
	const wrong = (column: string, message: string) => ({ ...row, problem: { column, message } });
	if (!row.die) return wrong('die', 'The die is missing.');
	if (!row.countedAt) return wrong('counted_at', 'counted_at is missing.');
	const countedAt = normalizeInstant(row.countedAt, zone);
	if (!countedAt) {
		return wrong(
			'counted_at',
			`"${row.countedAt}" is not a date and time at the plant (use 2026-03-01 14:30, plant time).`
		);
	}
	const shots = wholeNumber(row.shots);
	const start = wholeNumber(row.counterStart);
	const end = wholeNumber(row.counterEnd);
	if (shots === 'bad')
		return wrong('shots', `Shots must be a whole number (found "${row.shots}").`);
	if (start === 'bad') {
		return wrong(
			'counter_start',
			`counter_start must be a whole number (found "${row.counterStart}").`
		);
	}
	if (end === 'bad') {
		return wrong('counter_end', `counter_end must be a whole number (found "${row.counterEnd}").`);
	}
	if ((start === null) !== (end === null)) {
		return wrong(
			start === null ? 'counter_start' : 'counter_end',
			'Give both counter readings, or shots.'
		);
	}
	if (shots === null && start === null) {
		return wrong('shots', 'Give shots, or counter_start and counter_end.');
	}
	const count = shots ?? (end as number) - (start as number);
	return {
		...row,
		input: {
			die: row.die,
			shots: count,
			countedAt,
			machine: row.press || null,
			counterStart: start,
			counterEnd: end,
			note: row.note || null,
			resetReason: cells.reset_reason || null,
			key:
				row.key ||
				deriveRowKey({
					die: row.die,
					countedAt,
					shots: count,
					counterStart: start,
					counterEnd: end,
					press: row.press
				})
		}
	};
}

/**
 * Reads an upload: header row, comma or semicolon (detected), UTF-8 with or without BOM, at
 * most 2 MB and 5000 data rows. File-level problems come back as one message; row-level ones
 * stay on their row. A counted_at without an offset is plant time (`zone`).
 */
export function parseShotCsv(text: string, zone = plantZone()): ParsedCsv {
	if (Buffer.byteLength(text, 'utf8') > MAX_CSV_BYTES) {
		return { ok: false, message: 'The file is larger than 2 MB. Split it into smaller files.' };
	}
	const body = text.replace(/^\uFEFF/, '');
	if (!body.trim()) return { ok: false, message: 'The file is empty.' };
	const delimiter = detectDelimiter(body);
	let records: { record: string[]; info: { lines: number } }[];
	try {
		records = parse(body, {
			delimiter,
			bom: true,
			info: true,
			relax_column_count: true,
			skip_empty_lines: true,
			skip_records_with_empty_values: true,
			trim: true,
			// Stop reading once there is one row too many: a 100 000-row file is refused after
			// 5001 rows, not parsed whole first.
			to: MAX_CSV_ROWS + 2
		}) as unknown as { record: string[]; info: { lines: number } }[];
	} catch (err) {
		const e = err as { message?: string; lines?: number };
		const where = e.lines ? ` near line ${e.lines}` : '';
		return { ok: false, message: `The file is not readable as CSV${where}: ${e.message ?? err}` };
	}
	const [head, ...data] = records;
	const index = new Map<Column, number>();
	const ignoredColumns: string[] = [];
	head.record.forEach((name, i) => {
		const norm = name
			.toLowerCase()
			.trim()
			.replace(/[\s-]+/g, '_');
		const column = (CSV_COLUMNS as readonly string[]).includes(norm)
			? (norm as Column)
			: ALIASES[norm.replace(/_/g, '')];
		if (column && !index.has(column)) index.set(column, i);
		else if (name.trim()) ignoredColumns.push(name.trim());
	});
	const missing: string[] = [];
	if (!index.has('die')) missing.push('die');
	if (!index.has('counted_at')) missing.push('counted_at');
	if (!index.has('shots') && !(index.has('counter_start') && index.has('counter_end'))) {
		missing.push('shots (or counter_start and counter_end)');
	}
	if (missing.length) {
		return {
			ok: false,
			message: `The header row lacks ${missing.join(', ')}. The first row must name the columns, e.g. die${delimiter}counted_at${delimiter}shots${delimiter}press.`
		};
	}
	if (data.length === 0)
		return { ok: false, message: 'The file has a header row but no data rows.' };
	if (data.length > MAX_CSV_ROWS) {
		return {
			ok: false,
			message: `The file has more than ${MAX_CSV_ROWS} data rows; upload at most ${MAX_CSV_ROWS} at a time.`
		};
	}
	const rows = data.map(({ record, info }) => {
		const cells = Object.fromEntries(
			CSV_COLUMNS.map((c) => [c, index.has(c) ? (record[index.get(c)!] ?? '').trim() : ''])
		) as Record<Column, string>;
		return readRow(cells, info.lines, zone);
	});
	return { ok: true, delimiter, rows, ignoredColumns };
}

function strip(row: CsvShotRow): Omit<CsvShotRow, 'input' | 'problem'> {
	// eslint-disable-next-line @typescript-eslint/no-unused-vars
	const { input, problem, ...rest } = row;
	return rest;
}

/** Judges every readable row with the ledger (a dry run) and marks each valid, duplicate or wrong. */
export async function previewShotCsv(
	db: DB,
	parsed: Extract<ParsedCsv, { ok: true }>,
	actor: LedgerActor,
	now?: string
): Promise<{
	preview: CsvPreview;
	inputs: { row: number; input: ShotInput }[];
	flagged: { row: number; input: ShotInput }[];
}> {
	const readable = parsed.rows.flatMap((r, row) => (r.input ? [{ row, input: r.input }] : []));
	const verdict = new Map<
		number,
		{ status: RowStatus; column: string | null; reason: string | null }
	>();
	parsed.rows.forEach((r, i) => {
		if (r.problem)
			verdict.set(i, { status: 'wrong', column: r.problem.column, reason: r.problem.message });
	});
	// A dry run answers per row only when every row passes, so refused rows are marked and the
	// rest asked again (dropping a row can change what follows it, e.g. the elapsed-time check).
	let candidates = readable;
	for (let round = 0; candidates.length > 0 && round < 10; round++) {
		const result = await recordShots(
			db,
			candidates.map((r) => r.input),
			actor,
			{ source: 'csv', now, dryRun: true }
		);
		if (result.ok) {
			result.outcome.forEach((o, i) =>
				verdict.set(
					candidates[i].row,
					o === 'duplicate'
						? { status: 'duplicate', column: null, reason: DUPLICATE_REASON }
						: { status: 'valid', column: null, reason: null }
				)
			);
			break;
		}
		const refused = new Set<number>();
		for (const issue of result.issues) {
			refused.add(issue.index);
			const row = candidates[issue.index].row;
			if (issue.field === 'confirm') {
				verdict.set(row, { status: 'confirm', column: null, reason: issue.message });
				continue;
			}
			// A derived key means nothing to the person who wrote the file; say what it stands for.
			const derived = issue.field === 'key' && !parsed.rows[row].key;
			verdict.set(row, {
				status: 'wrong',
				column: derived ? null : (LEDGER_TO_COLUMN[issue.field] ?? issue.field),
				reason: derived
					? /twice/.test(issue.message)
						? 'Repeats an earlier row of this file (same die, time, count and press).'
						: 'The same reading was already counted for another die.'
					: issue.message
			});
		}
		candidates = candidates.filter((_, i) => !refused.has(i));
	}
	for (const r of candidates) {
		if (!verdict.has(r.row)) {
			verdict.set(r.row, {
				status: 'wrong',
				column: null,
				reason: 'Could not be checked; upload again.'
			});
		}
	}
	const rows: PreviewRow[] = parsed.rows.map((r, i) => ({ ...strip(r), ...verdict.get(i)! }));
	let shots = 0;
	const inputs: { row: number; input: ShotInput }[] = [];
	const flagged: { row: number; input: ShotInput }[] = [];
	rows.forEach((r, i) => {
		if (r.status === 'confirm') flagged.push({ row: i, input: parsed.rows[i].input! });
		else if (r.status !== 'wrong') inputs.push({ row: i, input: parsed.rows[i].input! });
		if (r.status === 'valid') shots += parsed.rows[i].input!.shots;
	});
	return {
		preview: {
			delimiter: parsed.delimiter,
			ignoredColumns: parsed.ignoredColumns,
			rows,
			valid: rows.filter((r) => r.status === 'valid').length,
			duplicates: rows.filter((r) => r.status === 'duplicate').length,
			confirm: flagged.length,
			wrong: rows.filter((r) => r.status === 'wrong').length,
			shots
		},
		inputs,
		flagged
	};
}

export type CommitResult =
	| {
			ok: true;
			counted: number;
			duplicates: number;
			shots: number;
			dies: { die: string; totalShots: number }[];
	  }
	| { ok: false; message: string; preview: CsvPreview | null };

/**
 * Commits an upload: the file text comes back from the browser, so it is read and judged again
 * from scratch; then every valid row is counted in one transaction, or none is. `expectedValid`
 * is what the preview promised — if the file or the ledger changed since, the new preview is
 * shown instead of counting something the user did not see. Rows the plausibility checks
 * flagged are counted only with `confirmReason` (at least 5 characters), which is kept on each.
 */
export async function commitShotCsv(
	db: DB,
	text: string,
	expectedValid: number,
	actor: LedgerActor,
	now?: string,
	confirmReason = ''
): Promise<CommitResult> {
	const parsed = parseShotCsv(text);
	if (!parsed.ok) return { ok: false, message: parsed.message, preview: null };
	const { preview, inputs: plain, flagged } = await previewShotCsv(db, parsed, actor, now);
	const reason = confirmReason.trim();
	if (reason && reason.length < 5) {
		return {
			ok: false,
			message: 'Give the reason for counting the flagged rows (at least 5 characters).',
			preview
		};
	}
	// Flagged rows go back in file order, carrying the person's reason.
	const inputs = reason
		? [
				...plain,
				...flagged.map((f) => ({ row: f.row, input: { ...f.input, confirmReason: reason } }))
			].sort((a, b) => a.row - b.row)
		: plain;
	if (preview.valid !== expectedValid) {
		return {
			ok: false,
			message: `The rows changed since the preview (${preview.valid} valid now, ${expectedValid} before). Check the new preview and count again.`,
			preview
		};
	}
	if (preview.valid === 0 && !(reason && flagged.length)) {
		return { ok: false, message: 'No row is left to count.', preview };
	}
	const result = await recordShots(
		db,
		inputs.map((i) => i.input),
		actor,
		{ source: 'csv', now }
	);
	if (!result.ok) {
		const { preview: fresh } = await previewShotCsv(db, parsed, actor, now);
		return {
			ok: false,
			message: 'Some rows were refused as the ledger moved on; nothing was counted.',
			preview: fresh
		};
	}
	return {
		ok: true,
		counted: result.accepted,
		duplicates: result.duplicates,
		shots: preview.shots + (reason ? flagged.reduce((sum, f) => sum + f.input.shots, 0) : 0),
		dies: result.dies
	};
}
