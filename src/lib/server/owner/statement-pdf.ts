/**
 * Lays out the period statement (period-statement.ts) as an A4 PDF with pdfmake. Only the standard PDF fonts (Helvetica)
 * are used, so no font file is read or fetched; every value goes in as plain pdfmake text, never
 * markup. Streams are left uncompressed: the statement is small and stays searchable.
 */
import pdfmake from 'pdfmake';
import { formatDate, formatShots } from '../../format';
import { plantDate, plantDateTime, plantZone } from '../../plant-time';
import { DIE_STATUS_FOR_OWNERS } from '../../labels';
import { plantContactLine } from '../settings/plant-identity';
import type { PeriodStatement, PeriodStatementDie } from './period-statement';
import { lastServiceText } from './service-history';

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
const money = (n: number | null, currency: string) =>
	n === null ? '-' : `${n.toFixed(2)} ${currency}`;
const right = (text: string) => ({ text, alignment: 'right' });
const th = (text: string, align: 'left' | 'right' = 'left') => ({
	text,
	style: 'th',
	alignment: align
});

function endOfLifeText(d: PeriodStatementDie): string {
	if (d.status === 'retired') return 'Retired';
	if (d.shotsRemaining <= 0) return 'Expected life reached';
	return d.projectedEndOfLife ?? 'Not projected (no recent shots)';
}

function reorderText(d: PeriodStatementDie): string {
	if (d.status === 'retired') return '-';
	if (!d.reorderBy) return 'Not projected';
	return d.reorderDue ? `${d.reorderBy} (due now)` : d.reorderBy;
}

function shotsTable(s: PeriodStatement) {
	const body = s.dies.map((d) => [
		{ text: t(d.number), bold: true },
		t(d.partNumber ? `${d.partName}\n${d.partNumber}` : d.partName),
		t(DIE_STATUS_FOR_OWNERS[d.status]),
		right(formatShots(d.openingShots)),
		right(formatShots(d.periodShots)),
		right(formatShots(d.closingShots))
	]);
	const tt = s.totals;
	return {
		table: {
			headerRows: 1,
			dontBreakRows: true,
			widths: ['auto', '*', 80, 'auto', 'auto', 'auto'],
			body: [
				[
					th('Die'),
					th('Part'),
					th('Status'),
					th('Opening shots', 'right'),
					th('Shots in period', 'right'),
					th('Closing shots', 'right')
				],
				...body,
				[
					{ text: 'All dies', bold: true },
					'',
					'',
					{ text: formatShots(tt.openingShots), bold: true, alignment: 'right' },
					{ text: formatShots(tt.periodShots), bold: true, alignment: 'right' },
					{ text: formatShots(tt.closingShots), bold: true, alignment: 'right' }
				]
			]
		},
		layout: 'lightHorizontalLines',
		fontSize: 8.5,
		margin: [0, 2, 0, 12]
	};
}

function lifeTable(s: PeriodStatement) {
	const body = s.dies.map((d) => [
		{ text: t(d.number), bold: true },
		right(pct(d.lifeUsedPct)),
		right(formatShots(d.shotsRemaining)),
		t(endOfLifeText(d)),
		t(reorderText(d)),
		right(`${d.leadDays} d${d.leadDaysFrom === 'family' ? ' *' : ''}`),
		t(lastServiceText(d.lastService))
	]);
	return {
		table: {
			headerRows: 1,
			dontBreakRows: true,
			widths: ['auto', 'auto', 'auto', 62, 62, 'auto', '*'],
			body: [
				[
					th('Die'),
					th('Life used', 'right'),
					th('Shots remaining', 'right'),
					th('Projected end of life'),
					th('Reorder by'),
					th('Lead time', 'right'),
					th('Last service')
				],
				...body
			]
		},
		layout: 'lightHorizontalLines',
		fontSize: 8.5,
		margin: [0, 2, 0, 4]
	};
}

function dieDetail(s: PeriodStatement, d: PeriodStatementDie) {
	const lines: unknown[] = [
		{ text: t(`${d.number} · ${d.partName}`), bold: true, fontSize: 9.5, margin: [0, 6, 0, 2] }
	];
	if (s.period.kind !== 'month' || d.months.length > 2) {
		lines.push({
			text: t(
				d.months
					.map((m) =>
						m.openingBalance
							? `${m.label}: ${formatShots(m.closing)}`
							: `${m.label}: +${formatShots(m.shots)} = ${formatShots(m.closing)}`
					)
					.join('  |  ')
			),
			fontSize: 8,
			color: '#374151'
		});
	}
	lines.push(
		d.services.length
			? {
					ul: d.services.map((e) =>
						t(`${formatDate(e.at)} · ${e.title}${e.detail ? `: ${e.detail}` : ''}`)
					),
					fontSize: 8.5,
					margin: [6, 2, 0, 0]
				}
			: { text: 'No service recorded in this period.', fontSize: 8.5, color: '#374151' }
	);
	if (d.repairs.length) {
		lines.push({
			table: {
				headerRows: 1,
				widths: ['auto', '*', 'auto', 'auto'],
				body: [
					[th('Date'), th('Billable repair'), th('Hours', 'right'), th('Cost', 'right')],
					...d.repairs.map((r) => [
						formatDate(r.at),
						t(r.title),
						right(r.hours === null ? '-' : String(r.hours)),
						right(t(money(r.cost, s.plant.currency)))
					])
				]
			},
			layout: 'lightHorizontalLines',
			fontSize: 8.5,
			margin: [6, 4, 0, 0]
		});
	}
	return { stack: lines };
}

/** The period statement as PDF bytes; `logo` is the plant's logo (a re-encoded JPEG), when it has one. */
export async function renderPeriodStatementPdf(
	s: PeriodStatement,
	logo: Uint8Array | null = null
): Promise<Buffer> {
	const plant = s.plant;
	const owner = `${s.customer.name} (${s.customer.code})`;
	const contact = plantContactLine(plant);
	const period = `${s.period.label}, ${s.period.from} to ${s.period.to}`;
	const footerText = plant.statementFooter || `${plant.name} · prepared with Castellan`;
	const tt = s.totals;
	const doc = {
		compress: false,
		pageSize: 'A4',
		pageMargins: [40, 52, 40, 56],
		info: {
			title: t(`Tooling statement ${s.reference}`),
			author: t(plant.name),
			subject: t(`Tooling statement ${s.customer.name}, ${s.period.label}`),
			creator: 'Castellan'
		},
		defaultStyle: { font: 'Helvetica', fontSize: 10, lineHeight: 1.15 },
		styles: {
			plant: { fontSize: 12, bold: true, color: '#2b3139' },
			title: { fontSize: 18, bold: true, margin: [0, 6, 0, 2] },
			h2: { fontSize: 12, bold: true, margin: [0, 8, 0, 4] },
			th: { bold: true, fontSize: 8.5, color: '#111827' },
			note: { fontSize: 8, color: '#4b5563' }
		},
		header: (page: number) =>
			page === 1
				? null
				: {
						text: t(`${plant.name} · ${s.reference} · ${owner} · ${s.period.label}`),
						style: 'note',
						margin: [40, 24, 40, 0]
					},
		footer: (page: number, pages: number) => ({
			columns: [
				{ text: t(footerText), style: 'note', width: '*' },
				{
					text: t(`${s.reference} · Page ${page} of ${pages}`),
					style: 'note',
					alignment: 'right',
					width: 'auto'
				}
			],
			margin: [40, 16, 40, 0]
		}),
		content: [
			{
				columns: [
					...(logo
						? [
								{
									image: `data:image/jpeg;base64,${Buffer.from(logo).toString('base64')}`,
									fit: [64, 48],
									width: 72
								}
							]
						: []),
					{
						stack: [
							{ text: t(plant.name), style: 'plant' },
							...(contact ? [{ text: t(contact), style: 'note' }] : [])
						],
						width: '*'
					}
				]
			},
			{ text: 'Tooling statement', style: 'title' },
			{
				table: {
					widths: ['auto', '*'],
					body: [
						['Reference', { text: t(s.reference), bold: true }],
						['Period', t(period)],
						['Tooling owner', t(owner)],
						['Issued', `${plantDateTime(s.issuedAt)} (${plantZone()})`]
					]
				},
				layout: 'noBorders',
				fontSize: 9.5,
				margin: [0, 2, 0, 8]
			},
			{ text: 'Shots', style: 'h2' },
			s.dies.length
				? shotsTable(s)
				: { text: 'No dies are registered for you.', margin: [0, 0, 0, 12] },
			{ text: 'Life and replacement', style: 'h2' },
			...(s.dies.length ? [lifeTable(s)] : []),
			{
				text: t(
					`Life figures are as of the statement date (${plantDate(s.issuedAt)}). Reorder by = projected end of life less the replacement lead time; * = the plant's default lead time for the alloy family. A projection assumes the die keeps the shot rate of the last 28 days; these are planning figures, not a guarantee of die life.`
				),
				style: 'note',
				margin: [0, 0, 0, 6]
			},
			{ text: 'Services and billable repairs in the period', style: 'h2' },
			...s.dies.map((d) => dieDetail(s, d)),
			{
				text: t(
					`Billable repairs in the period: ${tt.repairHours} h${tt.repairCost === null ? ' (the plant has set no hourly rate)' : `, ${money(tt.repairCost, plant.currency)}`}.`
				),
				bold: true,
				fontSize: 9,
				margin: [0, 10, 0, 0]
			}
		]
	};
	return pdfmake.createPdf(doc).getBuffer();
}
