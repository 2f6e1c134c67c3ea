/**
 * The e-mail a die's owner gets: its dies' life points (80 %, 95 %, reorder-by come) with the
 * die's figures, and questions the toolroom lead asks, each with a link to the die's page in the
 * owner portal. Plain text and HTML say the same; every value is escaped in the HTML. Only what
 * the owner may read goes in: die facts, the figures, the question and quote.
 */
import { formatPct, formatShots } from '../../format';
import { plantDate, plantTimeNote } from '../../plant-time';
import { escapeHtml, layoutEmail } from '../mail/html';
import { describeQuote } from '../../quote';
import type { ComposedMail, DigestEntry } from './digest';
import {
	NOTICE_LEVEL_LABELS,
	NOTICE_LEVELS,
	type OwnerDecisionPayload,
	type OwnerLifePayload
} from './types';

const base = (origin: string) => origin.replace(/\/+$/, '');

/** The die's page in the owner portal. */
export function ownerDieLink(origin: string, dieNumber: string): string {
	return `${base(origin)}/owner/dies/${encodeURIComponent(dieNumber)}`;
}

const FOOTER =
	'You receive this as a contact for tooling you own that this plant runs. Portal users can ' +
	'switch e-mail notices off under Account; the plant changes the contact address.';

/** The figures of an owner life item, one line. */
function figures(p: OwnerLifePayload): string {
	return [
		`life used ${formatPct(p.lifeUsedPct)}`,
		`${formatShots(p.shotsRemaining)} shots remaining`,
		`projected end of life ${p.projectedEndOfLife ?? 'not projected (no shots in the last 28 days)'}`,
		`reorder by ${p.reorderBy ?? 'not projected'} (replacement lead time ${p.leadDays} days)`
	].join('; ');
}

/** What an owner item says, one line of plain text. */
export function describeOwnerEntry(p: OwnerLifePayload | OwnerDecisionPayload): string {
	if (p.kind === 'owner_decision') {
		const quote = describeQuote(p.quotedHours, p.quotedCost);
		return `The die is held until you decide. ${p.askedBy} asks: ${p.question}${quote ? `. ${quote}` : ''}`;
	}
	const head =
		p.threshold === null
			? `The reorder-by date has come: order the replacement now for it to arrive before the die wears out`
			: `The die has passed ${p.threshold} % of its expected life`;
	return `${head}. Figures: ${figures(p)}.`;
}

/** One e-mail for one owner recipient, one block per die. */
export function composeOwnerMail(
	entries: readonly DigestEntry[],
	options: { origin: string; asOf: string; plantFooter?: string }
): ComposedMail {
	if (entries.length === 0) throw new Error('An owner mail needs at least one item.');
	const rank = (e: DigestEntry) => NOTICE_LEVELS.indexOf(e.level);
	const sorted = [...entries].sort(
		(a, b) =>
			rank(a) - rank(b) || (a.dieNumber < b.dieNumber ? -1 : a.dieNumber > b.dieNumber ? 1 : 0)
	);
	const asks = sorted.some((e) => e.level === 'decision_asked');
	const subject =
		sorted.length === 1
			? `Castellan: ${sorted[0].subject}`
			: `Castellan: ${sorted.length} notices about your tooling${asks ? ' (a decision is asked)' : ''}`;
	const title = `About your tooling, ${plantDate(options.asOf)}`;
	const intro = asks
		? 'The plant asks for your decision on a die you own, and tells you where your dies stand.'
		: 'Where dies you own stand: plan and order their replacement from these figures.';
	const text: string[] = [title, '', intro, ''];
	const html: string[] = [`<p style="margin:0 0 16px;">${escapeHtml(intro)}</p>`];
	const dies = new Map<string, DigestEntry[]>();
	for (const e of sorted) dies.set(e.dieNumber, [...(dies.get(e.dieNumber) ?? []), e]);
	for (const block of dies.values()) {
		const first = block[0].payload;
		const link = ownerDieLink(options.origin, first.dieNumber);
		text.push(`- ${first.dieNumber} ${first.partName}`, `  ${link}`);
		const items: string[] = [];
		for (const e of block) {
			const p = e.payload;
			if (p.kind !== 'owner_life' && p.kind !== 'owner_decision') continue;
			const line = `${NOTICE_LEVEL_LABELS[e.level]}: ${describeOwnerEntry(p)}`;
			text.push(`  * ${line}`);
			if (p.kind === 'owner_decision') text.push(`    Answer in the portal: ${link}#decision`);
			items.push(`<li style="margin:2px 0;">${escapeHtml(line)}</li>`);
		}
		text.push('');
		const answer = block.some((e) => e.level === 'decision_asked')
			? `<p style="margin:6px 0 0;"><a href="${escapeHtml(`${link}#decision`)}" style="color:#b4530f;">Answer in the portal</a></p>`
			: '';
		html.push(
			`<div style="margin:0 0 14px;padding:8px 10px;border:1px solid #d1d5db;">`,
			`<p style="margin:0 0 4px;"><a href="${escapeHtml(link)}" style="color:#b4530f;font-family:monospace;">${escapeHtml(first.dieNumber)}</a> <strong>${escapeHtml(first.partName)}</strong></p>`,
			`<ul style="margin:0;padding-left:18px;font-size:14px;">${items.join('')}</ul>`,
			answer,
			'</div>'
		);
	}
	const note =
		'Life figures assume the die keeps the shot rate of the last 28 days: planning figures, not a guarantee of die life.';
	const zoneNote = plantTimeNote();
	text.push(note, zoneNote, '', '--', FOOTER);
	// The plant's name and contact (plant-identity.ts), so an owner knows whom to answer.
	if (options.plantFooter) text.push(options.plantFooter);
	const footer = options.plantFooter ? `${FOOTER} — ${options.plantFooter}` : FOOTER;
	html.push(
		`<p style="margin:16px 0 0;color:#6b7280;font-size:13px;">${escapeHtml(note)} ${escapeHtml(zoneNote)}</p>`
	);
	return {
		subject,
		text: text.join('\n'),
		html: layoutEmail({ title, bodyHtml: html.join('\n'), footerText: footer })
	};
}
