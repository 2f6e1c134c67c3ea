/**
 * The period statement as CSV rows, from the same data as the PDF (buildPeriodStatement). The
 * readable columns carry words and plant dates; the last two columns are for machines (row type
 * and the die's status code) and are named as such.
 */
import { formatDate } from '../../format';
import { DIE_STATUS_FOR_OWNERS } from '../../labels';
import type { PeriodStatement, PeriodStatementDie } from './period-statement';
import { lastServiceText } from './service-history';

export const STATEMENT_CSV_ROW_LABELS = {
	die: 'Die summary',
	service: 'Service done',
	repair: 'Billable repair',
	total: 'All dies'
} as const;

export function statementCsvHeader(statement: PeriodStatement): string[] {
	return [
		'Reference',
		'Period',
		'Die',
		'Part',
		'Part number',
		'Status',
		'Row',
		'Opening shots',
		'Shots',
		'Closing shots',
		'Life used %',
		'Shots remaining',
		'Projected end of life',
		'Reorder by',
		'Last service',
		'Date',
		'Service or repair',
		'Hours',
		`Cost (${statement.plant.currency})`,
		'row_type (machine)',
		'status_code (machine)'
	];
}

const blank = (n: number) => Array.from({ length: n }, () => '');

function dieRows(s: PeriodStatement, d: PeriodStatementDie): unknown[][] {
	const head = [
		s.reference,
		s.period.label,
		d.number,
		d.partName,
		d.partNumber ?? '',
		DIE_STATUS_FOR_OWNERS[d.status]
	];
	const rows: unknown[][] = [
		[
			...head,
			STATEMENT_CSV_ROW_LABELS.die,
			d.openingShots,
			d.periodShots,
			d.closingShots,
			d.lifeUsedPct.toFixed(1),
			d.shotsRemaining,
			d.projectedEndOfLife ?? '',
			d.reorderBy ?? '',
			lastServiceText(d.lastService),
			...blank(4),
			'die',
			d.status
		]
	];
	for (const m of d.months) {
		rows.push([
			...head,
			m.label,
			m.openingBalance ? m.closing : '',
			m.openingBalance ? '' : m.shots,
			m.closing,
			...blank(9),
			m.openingBalance ? 'opening_balance' : 'month',
			d.status
		]);
	}
	for (const e of d.services) {
		rows.push([
			...head,
			STATEMENT_CSV_ROW_LABELS.service,
			...blank(8),
			formatDate(e.at),
			e.detail ? `${e.title}: ${e.detail}` : e.title,
			...blank(2),
			'service',
			d.status
		]);
	}
	for (const r of d.repairs) {
		rows.push([
			...head,
			STATEMENT_CSV_ROW_LABELS.repair,
			...blank(8),
			formatDate(r.at),
			r.title,
			r.hours ?? '',
			r.cost === null ? '' : r.cost.toFixed(2),
			'repair',
			d.status
		]);
	}
	return rows;
}

/** Every row of the statement CSV: per die its summary, months, services and repairs, then the sum. */
export function statementCsvRows(statement: PeriodStatement): unknown[][] {
	const t = statement.totals;
	return [
		...statement.dies.flatMap((d) => dieRows(statement, d)),
		[
			statement.reference,
			statement.period.label,
			...blank(4),
			STATEMENT_CSV_ROW_LABELS.total,
			t.openingShots,
			t.periodShots,
			t.closingShots,
			...blank(7),
			t.repairHours,
			t.repairCost === null ? '' : t.repairCost.toFixed(2),
			'total',
			''
		]
	];
}

/** File name of a statement download, `<reference>.<ext>`. */
export function statementFileName(statement: { reference: string }, ext: 'pdf' | 'csv'): string {
	return `${statement.reference}.${ext}`.replace(/[^\w.-]/g, '_');
}
