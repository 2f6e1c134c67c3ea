/**
 * The job report: one page to file or hand over when a toolroom job closes — the die, what was
 * found, the work done, hours and parts, the inspections and cooling checks made under the job,
 * and photos of the die before and after the work. Laid out with pdfmake in the standard PDF
 * fonts, like the owner statement (statement-pdf.ts), whose font setup and text filter it uses.
 */
import pdfmake from 'pdfmake';
import { formatDate, formatShots } from '../../format';
import { HALF_LABELS, JOB_HALF_LABELS, JOB_STATUS_LABELS, jobKindLabel } from '../../labels';
import type { DB } from '../db/connect';
import { toWinAnsi } from '../owner/statement-pdf';
import type { PhotoStore } from '../photos/photo-store';
import { listJobEntries } from './job-entries';
import { listJobRecords } from './job-page';
import type { JobDetail } from './jobs';

/** Photos per side (before, after) on the one page. */
const PHOTOS_PER_SIDE = 2;

export interface JobReportPhoto {
	stage: 'before' | 'after';
	caption: string | null;
	/** Thumbnail JPEG (≤ 400 px), enough for print at this size. */
	jpeg: Buffer;
}

export interface JobReport {
	job: JobDetail;
	records: Awaited<ReturnType<typeof listJobRecords>>;
	/** Work entries and parts used; voided ones are left out of the report. */
	entries: Awaited<ReturnType<typeof listJobEntries>>;
	photos: JobReportPhoto[];
}

/**
 * Gathers what the report shows. Photos tagged before / after come first; untagged job photos
 * fill in (the earliest as "before", the latest as "after") only when none were tagged.
 */
export async function getJobReport(
	db: DB,
	job: JobDetail,
	photoStore: PhotoStore
): Promise<JobReport> {
	const [records, allEntries, rows] = await Promise.all([
		listJobRecords(db, job.id),
		listJobEntries(db, job.id),
		db
			.selectFrom('photos')
			.select(['thumb_file as thumbFile', 'stage', 'caption'])
			.where('job_id', '=', job.id)
			.orderBy('id')
			.execute()
	]);
	const tagged = (stage: 'before' | 'after') => rows.filter((r) => r.stage === stage);
	let before = tagged('before').slice(0, PHOTOS_PER_SIDE);
	let after = tagged('after').slice(-PHOTOS_PER_SIDE);
	const untagged = rows.filter((r) => r.stage === null);
	if (before.length === 0 && untagged.length > 0) before = untagged.slice(0, 1);
	if (after.length === 0 && untagged.length > 1) after = untagged.slice(-1);
	const photos: JobReportPhoto[] = [];
	for (const [stage, list] of [
		['before', before],
		['after', after]
	] as const) {
		for (const row of list) {
			const jpeg = await photoStore.get(row.thumbFile);
			if (jpeg) photos.push({ stage, caption: row.caption, jpeg });
		}
	}
	const entries = {
		work: allEntries.work.filter((w) => !w.voidedAt),
		parts: allEntries.parts.filter((p) => !p.voidedAt)
	};
	return { job, records, entries, photos };
}

const t = (text: string | null | undefined) => toWinAnsi(text ?? '');
const day = (iso: string | null) => (iso ? iso.slice(0, 10) : '—');

function photoColumn(report: JobReport, stage: 'before' | 'after') {
	const photos = report.photos.filter((p) => p.stage === stage);
	return {
		width: '*',
		stack: [
			{ text: stage === 'before' ? 'Before the work' : 'After the work', style: 'h3' },
			...(photos.length
				? photos.map((p) => ({
						stack: [
							{
								image: `data:image/jpeg;base64,${p.jpeg.toString('base64')}`,
								fit: [240, 120]
							},
							{ text: t(p.caption), style: 'note', margin: [0, 1, 0, 4] }
						]
					}))
				: [{ text: 'No photo.', style: 'note' }])
		]
	};
}

/** The report as PDF bytes; `plantName` heads it. */
export async function renderJobReportPdf(report: JobReport, plantName: string): Promise<Buffer> {
	const { job, records, entries } = report;
	const facts: [string, string][] = [
		['Die', `${job.dieNumber} · ${job.partName}`],
		['Owner', job.customerName],
		[
			'Kind',
			`${jobKindLabel(job.kind)} · ${JOB_HALF_LABELS[job.half]}${job.zone ? ` · ${job.zone}` : ''}`
		],
		['Status', JOB_STATUS_LABELS[job.status]],
		['Opened', `${day(job.opened_at)} at ${formatShots(job.die_shots_at_open)} shots`],
		[
			'Closed',
			job.closed_at
				? `${day(job.closed_at)} at ${formatShots(job.die_shots_at_close)} shots${job.closedByName ? ` by ${job.closedByName}` : ''}`
				: 'Not closed'
		],
		['Hours', job.hours === null ? '—' : `${job.hours} h`],
		[
			'Parts used',
			entries.parts.length ? entries.parts.map((p) => `${p.quantity} × ${p.part}`).join('; ') : '—'
		],
		['Other parts', job.parts_used ?? '—']
	];
	const workLines = entries.work.map(
		(w) =>
			`${formatDate(w.at)}: ${w.hours} h${w.note ? `, ${w.note}` : ''}${w.by ? ` (${w.by})` : ''}`
	);
	const recordLines = [
		...records.inspections.map(
			(s) =>
				`Surface inspection, ${HALF_LABELS[s.half]}, ${s.zone}: grade ${s.grade}${s.longestCrackMm !== null ? `, longest crack ${s.longestCrackMm} mm` : ''} at ${formatShots(s.shotsAt)} shots (${day(s.at)})`
		),
		...records.coolingChecks.map(
			(k) =>
				`Cooling check, ${k.circuit}: ${k.measuredFlowLpm} of ${k.nominalFlowLpm} L/min, leak test ${k.leakTest === 'pass' ? 'passed' : 'failed'}${k.flushed ? ', line flushed' : ''} (${day(k.at)})`
		)
	];
	const doc = {
		compress: false,
		pageSize: 'A4',
		pageMargins: [36, 36, 36, 40],
		info: {
			title: t(`Job report ${job.number}`),
			author: t(plantName),
			subject: 'Toolroom job report',
			creator: 'Castellan'
		},
		defaultStyle: { font: 'Helvetica', fontSize: 9, lineHeight: 1.1 },
		styles: {
			plant: { fontSize: 10, bold: true, color: '#2b3139' },
			title: { fontSize: 16, bold: true, margin: [0, 2, 0, 6] },
			h2: { fontSize: 10.5, bold: true, margin: [0, 6, 0, 2] },
			h3: { fontSize: 9.5, bold: true, margin: [0, 0, 0, 2] },
			note: { fontSize: 7.5, color: '#4b5563' }
		},
		footer: () => ({
			text: t(
				`${plantName} · prepared with Castellan. Toolroom work follows the plant's lockout and hot-die procedures and local codes.`
			),
			style: 'note',
			margin: [36, 12, 36, 0]
		}),
		content: [
			{ text: t(plantName), style: 'plant' },
			{ text: t(`Job report ${job.number}`), style: 'title' },
			{
				table: {
					widths: [70, '*'],
					body: facts.map(([k, v]) => [{ text: k, bold: true }, { text: t(v) }])
				},
				layout: 'noBorders'
			},
			{ text: 'Task', style: 'h2' },
			{ text: t(job.description) },
			{ text: 'Findings', style: 'h2' },
			{ text: t(job.findings ?? 'Not recorded.') },
			{ text: 'Work done', style: 'h2' },
			{ text: t(job.work_done ?? 'Not recorded.') },
			...(workLines.length
				? [{ text: 'Hours recorded', style: 'h2' }, { ul: workLines.map((line) => t(line)) }]
				: []),
			...(recordLines.length
				? [
						{ text: 'Inspections and checks under this job', style: 'h2' },
						{ ul: recordLines.map((line) => t(line)) }
					]
				: []),
			{ text: 'Photos', style: 'h2' },
			{ columns: [photoColumn(report, 'before'), photoColumn(report, 'after')], columnGap: 12 }
		]
	};
	return pdfmake.createPdf(doc).getBuffer();
}
