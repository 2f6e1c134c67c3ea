import { formatDate, formatShots } from '../../format';
import { plantDate, plantTimeNote } from '../../plant-time';
import { HALF_LABELS, serviceKindLabel } from '../../labels';
import { escapeHtml, layoutEmail } from '../mail/html';
import type { DieConcerns } from './concerns';
import { describeOwnerEntry } from './owner-mail';
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
	/** Grade-3+ cracks and weak circuits per die number, shown in that die's block. */
	concerns?: ReadonlyMap<string, DieConcerns>;
	/** The plant's name and contact line (plant-identity.ts `mailFooterFor`), under the footer. */
	plantFooter?: string;
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
 * Dies listed one by one in a digest, worst first; the rest are counted. A first run in a plant
 * with years of backlog should give a readable mail, not thousands of lines.
 */
export const MAX_LISTED_ITEMS = 200;

const FOOTER =
	'You receive this because e-mail notices are switched on for your Castellan account. ' +
	'Switch them off under Account in Castellan (link above).';

/** Link to a die page; the number is encoded, the origin is the configured one. */
export function dieLink(origin: string, dieNumber: string): string {
	return `${origin.replace(/\/+$/, '')}/dies/${encodeURIComponent(dieNumber)}`;
}

const base = (origin: string) => origin.replace(/\/+$/, '');

/** Links to the exact place an item is dealt with; the first is the item's own page. */
export function entryLinks(
	origin: string,
	payload: NoticePayload
): { label: string; url: string }[] {
	const die = dieLink(origin, payload.dieNumber);
	switch (payload.kind) {
		case 'service':
			return [
				{ label: 'Plan task', url: `${die}/plan#task-${payload.taskId}` },
				{ label: 'Open a job for this', url: `${die}/jobs?task=${payload.taskId}#open-job` }
			];
		case 'life':
			return [{ label: 'Die', url: die }];
		case 'owner_answer':
			return [{ label: "The owner's answer", url: `${die}#owner-decision` }];
		case 'job_completed':
			return [
				{ label: 'Job', url: `${base(origin)}/jobs/${encodeURIComponent(payload.jobNumber)}` }
			];
		default:
			return [{ label: 'Die', url: die }];
	}
}

/** Where a recipient switches the notices off (the account page's notice setting). */
export const settingsLink = (origin: string) => `${base(origin)}/account#notices`;

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
		case 'owner_answer':
			return `${payload.answeredBy} answered "${payload.question}": ${payload.answer}${payload.answerText ? ` — ${payload.answerText}` : ''}. The die's state is unchanged until you move it.`;
		case 'owner_life':
		case 'owner_decision':
			return describeOwnerEntry(payload);
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
 * One digest e-mail for one recipient: one block per die (dies ordered by their worst item),
 * holding its notices, its grade-3+ cracks and weak cooling circuits (options.concerns), each
 * with links to the exact place (plan task, inspection, cooling, "open a job for this"), and a
 * link to the notification settings. Plain text and HTML carry the same content; every value is escaped in the
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

	// One block per die, dies ordered by their worst item, then by number.
	const rank = (level: NoticeLevel) => NOTICE_LEVELS.indexOf(level);
	const dies = new Map<string, DigestEntry[]>();
	for (const [, list] of groups) {
		for (const entry of list)
			dies.set(entry.dieNumber, [...(dies.get(entry.dieNumber) ?? []), entry]);
	}
	const blocks = [...dies.values()].sort(
		(a, b) =>
			rank(a[0].level) - rank(b[0].level) ||
			(a[0].dieNumber < b[0].dieNumber ? -1 : a[0].dieNumber > b[0].dieNumber ? 1 : 0)
	);
	const link = (url: string, label: string) =>
		`<a href="${escapeHtml(url)}" style="color:#b4530f;">${escapeHtml(label)}</a>`;

	const listed = blocks.slice(0, MAX_LISTED_ITEMS);
	for (const block of listed) {
		const first = block[0].payload;
		const die = dieLink(options.origin, first.dieNumber);
		const concerns = options.concerns?.get(first.dieNumber);
		text.push(`- ${first.dieNumber} ${first.partName} (${first.customerName})`, `  ${die}`);
		const items: string[] = [];
		for (const entry of block) {
			const p = entry.payload;
			const links = entryLinks(options.origin, p);
			const detail = `${NOTICE_LEVEL_LABELS[entry.level]}: ${describeEntry(p)}`;
			text.push(`  * ${detail}`, ...links.map((l) => `    ${l.label}: ${l.url}`));
			items.push(
				`<li style="margin:2px 0;">${escapeHtml(detail)}<br>${links.map((l) => link(l.url, l.label)).join(' · ')}</li>`
			);
		}
		for (const c of concerns?.cracks ?? []) {
			const url = `${die}/surface?zone=${encodeURIComponent(c.zone)}`;
			const detail = `Surface grade ${c.grade}: ${HALF_LABELS[c.half]}, ${c.zone}, at ${shotsWord(c.shotsAt)}`;
			const job = `${die}/jobs#open-job`;
			text.push(`  * ${detail}`, `    Inspection: ${url}`, `    Open a job for this: ${job}`);
			items.push(
				`<li style="margin:2px 0;">${escapeHtml(detail)}<br>${link(url, 'Inspection')} · ${link(job, 'Open a job for this')}</li>`
			);
		}
		for (const k of concerns?.weakCircuits ?? []) {
			const url = `${die}/cooling`;
			const detail = `Weak cooling circuit ${k.label}: ${Math.round(k.pctOfNominal)} % of nominal flow${k.leakFailed ? ', leak test failed' : ''}`;
			const job = `${die}/jobs#open-job`;
			text.push(`  * ${detail}`, `    Cooling: ${url}`, `    Open a job for this: ${job}`);
			items.push(
				`<li style="margin:2px 0;">${escapeHtml(detail)}<br>${link(url, 'Cooling')} · ${link(job, 'Open a job for this')}</li>`
			);
		}
		text.push('');
		html.push(
			`<div style="margin:0 0 14px;padding:8px 10px;border:1px solid #d1d5db;">`,
			`<p style="margin:0 0 4px;"><a href="${escapeHtml(die)}" style="color:#b4530f;font-family:monospace;">${escapeHtml(first.dieNumber)}</a> <strong>${escapeHtml(first.partName)}</strong> <span style="color:#6b7280;">· ${escapeHtml(first.customerName)}</span></p>`,
			`<ul style="margin:0;padding-left:18px;font-size:14px;">${items.join('')}</ul>`,
			'</div>'
		);
	}
	const more = blocks.length - listed.length;
	if (more > 0) {
		const home = `${base(options.origin)}${hasToolroomWork ? '/toolroom' : '/planner'}`;
		const line = `… and ${formatShots(more)} more dies. Only the first ${MAX_LISTED_ITEMS} are listed; Castellan shows them all:`;
		text.push(`${line} ${home}`, '');
		html.push(`<p style="margin:16px 0 0;">${escapeHtml(line)} ${link(home, home)}</p>`);
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
	const settings = settingsLink(options.origin);
	const footer = options.plantFooter ? `${FOOTER} — ${options.plantFooter}` : FOOTER;
	text.push(`Notification settings: ${settings}`, '', '--', FOOTER);
	if (options.plantFooter) text.push(options.plantFooter);
	html.push(
		`<p style="margin:16px 0 0;font-size:13px;">${link(settings, 'Notification settings')}</p>`
	);

	return {
		subject,
		text: text.join('\n'),
		html: layoutEmail({ title, bodyHtml: html.join('\n'), footerText: footer })
	};
}
