import { formatDate, formatShots } from '../../format';
import { plantDate, plantTimeNote } from '../../plant-time';
import { serviceKindLabel } from '../../labels';
import { escapeHtml, layoutEmail } from '../mail/html';
import {
	NOTICE_LEVEL_COUNT_WORDS,
	NOTICE_LEVEL_LABELS,
	NOTICE_LEVELS,
	type NoticeLevel,
	type NoticePayload
} from './types';

export interface DigestEntry {
	level: NoticeLevel;
	subject: string;
	/** Sort key within a level. */
	dieNumber: string;
	/** Read only for the items listed (the sender parses it lazily). */
	readonly payload: NoticePayload;
}

export interface DigestOptions {
	/** Base of every link, e.g. `https://castellan.plant.example`; no trailing slash needed. */
	origin: string;
	/** When the digest is made; shown as its date. */
	asOf: string;
}

export interface ComposedMail {
	subject: string;
	text: string;
	html: string;
}

const SAFETY =
	'Before any service or repair work: lock out the press, treat the die and any metal on it as ' +
	'hot, relieve stored hydraulic energy and wear the protective equipment your plant requires. ' +
	"The plant's procedures and local codes come first.";

/**
 * Items listed one by one in a digest, worst first; the rest are counted. A first run in a plant
 * with years of backlog should give a readable mail, not thousands of lines.
 */
export const MAX_LISTED_ITEMS = 200;

const FOOTER =
	'You receive this because e-mail notices are switched on for your Castellan account. ' +
	'Switch them off under Account in Castellan.';

/** Link to a die page; the number is encoded, the origin is the configured one. */
export function dieLink(origin: string, dieNumber: string): string {
	return `${origin.replace(/\/+$/, '')}/dies/${encodeURIComponent(dieNumber)}`;
}

function pct(fraction: number): string {
	return `${Math.floor(fraction * 100)} %`;
}

function shotsWord(n: number): string {
	return `${formatShots(Math.abs(n))} shot${Math.abs(n) === 1 ? '' : 's'}`;
}

function daysWord(n: number): string {
	const d = Math.floor(Math.abs(n));
	if (d === 0) return 'under a day';
	return `${d} day${d === 1 ? '' : 's'}`;
}

/** What the item says about its die, in one line of plain text. */
export function describeEntry(payload: NoticePayload): string {
	switch (payload.kind) {
		case 'service': {
			const parts = [
				`${serviceKindLabel(payload.taskKind)}: ${pct(payload.fraction)} of its interval`
			];
			if (payload.shotsRemaining !== null) {
				parts.push(
					payload.shotsRemaining >= 0
						? `${shotsWord(payload.shotsRemaining)} left`
						: `${shotsWord(payload.shotsRemaining)} past`
				);
			}
			if (payload.daysRemaining !== null) {
				parts.push(
					payload.daysRemaining >= 0
						? `${daysWord(payload.daysRemaining)} left`
						: `${daysWord(payload.daysRemaining)} past`
				);
			}
			return `${parts.join(', ')} (last done ${formatDate(payload.lastDoneAt)})`;
		}
		case 'life':
			return (
				`${payload.lifeUsedPct.toFixed(1)} % of expected life used ` +
				`(${formatShots(payload.totalShots)} of ${formatShots(payload.expectedLifeShots)} shots)`
			);
		case 'job_completed':
			return `${payload.jobNumber} closed${payload.summary ? `: ${payload.summary}` : ''}`;
		case 'die_state':
			return `Moved to ${payload.to}: ${payload.reason}. ${payload.consequence}`;
	}
}

function groupByLevel(entries: readonly DigestEntry[]): [NoticeLevel, DigestEntry[]][] {
	const groups: [NoticeLevel, DigestEntry[]][] = [];
	for (const level of NOTICE_LEVELS) {
		const inLevel = entries
			.filter((e) => e.level === level)
			.sort((a, b) => (a.dieNumber < b.dieNumber ? -1 : a.dieNumber > b.dieNumber ? 1 : 0));
		if (inLevel.length) groups.push([level, inLevel]);
	}
	return groups;
}

function subjectOf(groups: [NoticeLevel, DigestEntry[]][], count: number, single?: DigestEntry) {
	if (count === 1 && single) return `Castellan: ${single.subject}`;
	const onlyReady = groups.length === 1 && groups[0][0] === 'ready_again';
	if (onlyReady) return `Castellan: ${count} dies ready again`;
	const counts = groups.map(([level, list]) => `${list.length} ${NOTICE_LEVEL_COUNT_WORDS[level]}`);
	return `Castellan service notice: ${counts.join(', ')}`;
}

/**
 * One digest e-mail for one recipient: every item grouped by level, worst first, each with a
 * link to its die. Plain text and HTML carry the same content; every value is escaped in the
 * HTML. Nothing but die facts goes in: no tokens, no account data.
 */
export function composeDigest(
	entries: readonly DigestEntry[],
	options: DigestOptions
): ComposedMail {
	if (entries.length === 0) throw new Error('A digest needs at least one item.');
	const groups = groupByLevel(entries);
	const subject = subjectOf(groups, entries.length, entries[0]);
	const date = plantDate(options.asOf);
	const hasToolroomWork = entries.some((e) => e.level !== 'ready_again');
	const title = hasToolroomWork ? `Service notice, ${date}` : `Dies ready again, ${date}`;
	const intro = hasToolroomWork
		? 'These dies have reached a point in their service plan or life that needs the toolroom.'
		: 'The toolroom has finished with these dies; they can be booked again.';

	const text: string[] = [title, '', intro, ''];
	const html: string[] = [`<p style="margin:0 0 16px;">${escapeHtml(intro)}</p>`];

	let budget = MAX_LISTED_ITEMS;
	let omitted = 0;
	for (const [level, list] of groups) {
		const heading = `${NOTICE_LEVEL_LABELS[level]} (${list.length})`;
		text.push(heading.toUpperCase());
		html.push(
			`<h2 style="margin:20px 0 8px;font-size:16px;color:#2b3139;border-bottom:1px solid #d1d5db;padding-bottom:4px;">${escapeHtml(heading)}</h2>`,
			'<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="border-collapse:collapse;font-size:14px;">'
		);
		const listed = list.slice(0, budget);
		budget -= listed.length;
		for (const entry of listed) {
			const p = entry.payload;
			const link = dieLink(options.origin, p.dieNumber);
			const detail = describeEntry(p);
			text.push(`- ${p.dieNumber} ${p.partName} (${p.customerName})`, `  ${detail}`, `  ${link}`);
			html.push(
				'<tr>',
				`<td style="padding:6px 8px 6px 0;vertical-align:top;white-space:nowrap;font-family:monospace;"><a href="${escapeHtml(link)}" style="color:#b4530f;">${escapeHtml(p.dieNumber)}</a></td>`,
				`<td style="padding:6px 0;vertical-align:top;"><strong>${escapeHtml(p.partName)}</strong> <span style="color:#6b7280;">· ${escapeHtml(p.customerName)}</span><br>${escapeHtml(detail)}</td>`,
				'</tr>'
			);
		}
		html.push('</table>');
		const more = list.length - listed.length;
		if (more > 0) {
			omitted += more;
			const line = `… and ${formatShots(more)} more in this group.`;
			text.push(line);
			html.push(`<p style="margin:6px 0 0;color:#6b7280;">${escapeHtml(line)}</p>`);
		}
		text.push('');
	}
	if (omitted > 0) {
		const home = `${options.origin.replace(/\/+$/, '')}${hasToolroomWork ? '/toolroom' : '/planner'}`;
		const line = `Only the first ${MAX_LISTED_ITEMS} items are listed; Castellan shows them all:`;
		text.push(`${line} ${home}`, '');
		html.push(
			`<p style="margin:16px 0 0;">${escapeHtml(line)} <a href="${escapeHtml(home)}" style="color:#b4530f;">${escapeHtml(home)}</a></p>`
		);
	}

	if (hasToolroomWork) {
		text.push(SAFETY, '');
		html.push(
			`<p style="margin:20px 0 0;padding:10px 12px;background:#fff7ed;border-left:4px solid #e8711c;font-size:13px;">${escapeHtml(SAFETY)}</p>`
		);
	}
	const zoneNote = plantTimeNote();
	text.push(zoneNote, '');
	html.push(`<p style="margin:16px 0 0;color:#6b7280;font-size:13px;">${escapeHtml(zoneNote)}</p>`);
	text.push('--', FOOTER);

	return {
		subject,
		text: text.join('\n'),
		html: layoutEmail({ title, bodyHtml: html.join('\n'), footerText: FOOTER })
	};
}
