/**
 * Lays out the tooling statement as a PDF with pdfmake. Only the standard PDF fonts (Helvetica)
 * are used, so no font file is read or fetched; every value goes in as plain pdfmake text, never
 * markup. Streams are left uncompressed: the statement is small and stays searchable.
 */
import pdfmake from 'pdfmake';
import { formatDate, formatShots } from '../../format';
import { plantDate, plantZone } from '../../plant-time';
import {
	DIE_STATUS_FOR_OWNERS,
	SERVICE_STATE_LABELS,
	jobKindLabel,
	serviceKindLabel
} from '../../labels';
import type { OwnerStatement, StatementDie } from './statement';

const STANDARD_FONTS = [
	'Helvetica',
	'Helvetica-Bold',
	'Helvetica-Oblique',
	'Helvetica-BoldOblique'
];

pdfmake.setFonts({
	Helvetica: {
		normal: 'Helvetica',
		bold: 'Helvetica-Bold',
		italics: 'Helvetica-Oblique',
		bolditalics: 'Helvetica-BoldOblique'
	}
});
// No images or fonts come from outside: refuse every URL and every file but the built-in fonts.
pdfmake.setUrlAccessPolicy(() => false);
pdfmake.setLocalAccessPolicy((path) => STANDARD_FONTS.includes(path));

// The standard fonts encode WinAnsi only; these are the characters it has above Latin-1's ASCII.
const WIN_ANSI_EXTRA = new Set('€‚ƒ„…†‡ˆ‰Š‹ŒŽ‘’“”•–—˜™š›œžŸ');
const REPLACEMENTS: Record<string, string> = {
	'≥': '>=',
	'≤': '<=',
	'→': '->',
	'−': '-',
	'\u2009': ' '
};

/** Text the standard fonts can show: other characters become a close ASCII form or '?'. */
export function toWinAnsi(text: string): string {
	let out = '';
	for (const ch of text.normalize('NFC')) {
		const code = ch.codePointAt(0)!;
		if (ch === '\n' || (code >= 0x20 && code < 0x7f) || (code >= 0xa0 && code <= 0xff)) out += ch;
		else if (WIN_ANSI_EXTRA.has(ch)) out += ch;
		else if (ch in REPLACEMENTS) out += REPLACEMENTS[ch];
		else if (ch === '\t' || ch === '\r') out += ' ';
		else out += '?';
	}
	return out;
}

const t = (text: string) => toWinAnsi(text);
const pct = (n: number) => `${n.toFixed(1)} %`;

function replacementText(d: StatementDie): string {
	if (d.status === 'retired') return d.retiredAt ? `Retired ${formatDate(d.retiredAt)}` : 'Retired';
	if (d.shotsRemaining <= 0) return 'Expected life reached';
	return d.projectedEndOfLife ?? 'Not projected (no recent shots)';
}

function lastServiceText(d: StatementDie): string {
	if (!d.service.lastDoneAt) return 'None recorded';
	return formatDate(d.service.lastDoneAt);
}

function dieTable(dies: StatementDie[]) {
	const header = [
		'Die',
		'Part',
		'Status',
		'Shots',
		'Life used',
		'Projected replacement',
		'Last service'
	].map((h) => ({ text: h, style: 'th' }));
	const body = dies.map((d) => [
		{ text: t(d.number), bold: true },
		t(d.partNumber ? `${d.partName}\n${d.partNumber}` : d.partName),
		t(DIE_STATUS_FOR_OWNERS[d.status]),
		{ text: formatShots(d.totalShots), alignment: 'right' },
		{ text: pct(d.lifeUsedPct), alignment: 'right' },
		t(replacementText(d)),
		t(lastServiceText(d))
	]);
	return {
		table: {
			headerRows: 1,
			dontBreakRows: true,
			widths: ['auto', '*', 70, 'auto', 'auto', 76, 'auto'],
			body: [header, ...body]
		},
		layout: 'lightHorizontalLines',
		fontSize: 8.5,
		margin: [0, 4, 0, 14]
	};
}

function serviceHistory(d: StatementDie) {
	const s = d.service;
	const next = d.nextService
		? ` Next service task: ${serviceKindLabel(d.nextService.kind)}, ${SERVICE_STATE_LABELS[d.nextService.state].toLowerCase()}.`
		: '';
	const line =
		s.jobsDone === 0
			? `No toolroom work recorded.${next}`
			: `${s.jobsDone} toolroom job${s.jobsDone === 1 ? '' : 's'} finished, ${s.billable} billable to you; last on ${lastServiceText(d)}.${next}`;
	return {
		stack: [
			{ text: t(`${d.number} · ${d.partName}`), bold: true, fontSize: 9.5 },
			{ text: t(line), fontSize: 8.5, color: '#374151' },
			...(s.summaries.length
				? [
						{
							ul: s.summaries.map((m) =>
								t(
									`${m.date} · ${jobKindLabel(m.kind)}${m.billable ? ' (billable)' : ''}: ${m.text}`
								)
							),
							fontSize: 8.5,
							margin: [6, 2, 0, 0]
						}
					]
				: [])
		],
		margin: [0, 0, 0, 8],
		unbreakable: true
	};
}

function summaryBlock(s: OwnerStatement) {
	const cell = (label: string, value: string) => ({
		stack: [
			{ text: t(label), fontSize: 8, color: '#4b5563' },
			{ text: t(value), fontSize: 12, bold: true }
		]
	});
	const tt = s.totals;
	return {
		table: {
			widths: ['*', '*', '*', '*'],
			body: [
				[
					cell('Dies in service', String(tt.inService)),
					cell('Retired', String(tt.retired)),
					cell('Shots cast, all dies', formatShots(tt.totalShots)),
					cell('Shots, last 28 days', formatShots(tt.shotsLast28Days))
				],
				[
					cell('Near replacement (>= 90 % life)', String(tt.nearReplacement)),
					cell('Service due or overdue', String(tt.serviceDue)),
					cell(
						'Next projected replacement',
						tt.nextReplacement
							? `${tt.nextReplacement.number} on ${tt.nextReplacement.date}`
							: 'None projected'
					),
					cell('Dies on this statement', String(tt.dies))
				]
			]
		},
		layout: 'noBorders',
		margin: [0, 8, 0, 12]
	};
}

/** The statement as PDF bytes. `plantName` heads it; `asOf` is the statement date. */
export async function renderStatementPdf(
	statement: OwnerStatement,
	plantName: string
): Promise<Buffer> {
	const date = plantDate(statement.asOf);
	const owner = `${statement.customer.name} (${statement.customer.code})`;
	const doc = {
		compress: false,
		pageSize: 'A4',
		pageMargins: [40, 52, 40, 52],
		info: {
			title: t(`Tooling statement ${statement.customer.name} ${date}`),
			author: t(plantName),
			subject: 'Tooling statement',
			creator: 'Castellan'
		},
		defaultStyle: { font: 'Helvetica', fontSize: 10, lineHeight: 1.15 },
		styles: {
			plant: { fontSize: 11, bold: true, color: '#2b3139' },
			title: { fontSize: 20, bold: true, margin: [0, 2, 0, 2] },
			h2: { fontSize: 12, bold: true, margin: [0, 6, 0, 4] },
			th: { bold: true, fontSize: 8.5, color: '#111827' },
			note: { fontSize: 8, color: '#4b5563' }
		},
		header: (page: number) =>
			page === 1
				? null
				: {
						text: t(`${plantName} · Tooling statement · ${owner} · ${date}`),
						style: 'note',
						margin: [40, 24, 40, 0]
					},
		footer: (page: number, pages: number) => ({
			columns: [
				{ text: t(`${plantName} · prepared with Castellan`), style: 'note' },
				{ text: `Page ${page} of ${pages}`, style: 'note', alignment: 'right' }
			],
			margin: [40, 16, 40, 0]
		}),
		content: [
			{ text: t(plantName), style: 'plant' },
			{ text: 'Tooling statement', style: 'title' },
			{
				columns: [
					{ text: t(`Tooling owner: ${owner}`) },
					{ text: `Statement date: ${date} (${plantZone()})`, alignment: 'right' }
				]
			},
			summaryBlock(statement),
			{ text: 'Dies', style: 'h2' },
			statement.dies.length
				? dieTable(statement.dies)
				: { text: 'No dies are registered for you.', margin: [0, 0, 0, 12] },
			{ text: 'Service history', style: 'h2' },
			{
				text: 'Summaries are those the plant shared with you; the newest three per die are listed.',
				style: 'note',
				margin: [0, 0, 0, 6]
			},
			...statement.dies.map(serviceHistory),
			{
				text: t(
					'Life used counts the shots on the die against its expected life. A projected replacement date assumes the die keeps the shot rate of the last 28 days; a die that has not run in that time has no projection. These are planning figures, not a guarantee of die life.'
				),
				style: 'note',
				margin: [0, 10, 0, 0]
			}
		]
	};
	return pdfmake.createPdf(doc).getBuffer();
}
