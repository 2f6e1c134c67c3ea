/**
 * The die's history in words: one sentence per audit entry, for the die page and anything else
 * that shows a die's story. Every action a die's audit trail can hold has its own wording here;
 * an action added later without wording reads as its label from AUDIT_ACTION_LABELS or, failing
 * that, "Change recorded" — never a raw code such as "surface inspect".
 */
import { formatDate, formatDateTime, formatShots } from './format';
import {
	AUDIT_ACTION_LABELS,
	DIE_STATUS_LABELS,
	HALF_LABELS,
	JOB_HALF_LABELS,
	LEAK_TEST_LABELS,
	OWNER_ANSWER_LABELS,
	jobKindLabel,
	serviceKindLabel
} from './labels';
import type { DieStatus } from './domain';
import { describeQuote } from './quote';

export interface HistoryEntry {
	action: string;
	detail: Record<string, unknown>;
}

const text = (v: unknown) => (typeof v === 'string' ? v : v == null ? '' : String(v));
const reason = (d: Record<string, unknown>) =>
	typeof d.reason === 'string' && d.reason ? `: ${d.reason}` : '';
const half = (v: unknown) =>
	(JOB_HALF_LABELS as Record<string, string>)[text(v)] ??
	(HALF_LABELS as Record<string, string>)[text(v)] ??
	text(v);

function interval(v: unknown): string {
	const i = (v ?? {}) as { shots?: number | null; days?: number | null };
	const parts = [i.shots ? `${formatShots(i.shots)} shots` : '', i.days ? `${i.days} days` : ''];
	return parts.filter(Boolean).join(' / ') || '—';
}

const grade = (v: unknown) => `grade ${text(v)}`;

/** One readable sentence for an audit entry of a die. */
export function describeHistoryEntry(h: HistoryEntry): string {
	const d = h.detail;
	const kind = serviceKindLabel(text(d.kind));
	switch (h.action) {
		case 'die.create':
			return 'Die registered';
		case 'die.edit':
			return 'Register data edited';
		case 'die.status':
			return `State ${DIE_STATUS_LABELS[d.from as DieStatus] ?? text(d.from)} → ${DIE_STATUS_LABELS[d.to as DieStatus] ?? text(d.to)}${reason(d)}`;
		case 'half.replace':
			return `${half(d.side)} replaced at ${formatShots(Number(d.dieShots))} die shots${reason(d)}`;
		case 'shots.correction':
			return `Shot correction ${Number(d.shots) > 0 ? '+' : ''}${formatShots(Number(d.shots))}${reason(d)}`;
		case 'service.done':
			return `${kind} done at ${formatShots(Number(d.shots))} shots${d.job ? ` with job ${text(d.job)}` : d.doneAt ? ` (${formatDate(text(d.doneAt))})` : ''}`;
		case 'service.intervals':
			return `${kind} interval ${interval(d.from)} → ${interval(d.to)}`;
		case 'service.add':
			return `${kind} added to the plan, every ${interval(d)}`;
		case 'service.deactivate':
			return `${kind} taken off the plan${reason(d)}`;
		case 'job.open':
			return `Toolroom job ${text(d.job)} opened (${jobKindLabel(text(d.kind)).toLowerCase()}, ${half(d.half).toLowerCase()})`;
		case 'job.status':
			return `Toolroom job ${text(d.job)}: ${text(d.from).replace(/_/g, ' ')} → ${text(d.to).replace(/_/g, ' ')}`;
		case 'job.assign':
			return `Toolroom job ${text(d.job)} ${d.assignedTo ? 'assigned' : 'unassigned'}`;
		case 'job.close':
			return `Toolroom job ${text(d.job)} closed at ${formatShots(Number(d.shots))} shots`;
		case 'job.cancel':
			return `Toolroom job ${text(d.job)} cancelled${reason(d)}`;
		case 'job.void':
			return `Toolroom job ${text(d.job)} voided${reason(d)}`;
		case 'job.work':
			return `Toolroom job ${text(d.job)}: ${text(d.hours)} h recorded (${text((d.after as Record<string, unknown> | undefined)?.hours)} h in all)`;
		case 'job.part':
			return `Toolroom job ${text(d.job)}: ${text(d.quantity)} × ${text(d.part)} used`;
		case 'job.work.void':
		case 'job.part.void':
			return `Toolroom job ${text(d.job)}: ${h.action === 'job.work.void' ? 'hours' : 'part'} entry voided${reason(d)}`;
		case 'job.owner_summary':
			return `Owner summary of job ${text(d.job)} ${d.shared ? 'shared with the owner' : 'kept internal'}`;
		case 'surface.inspect':
			return `Surface inspection, ${half(d.half).toLowerCase()}, ${text(d.zone)}: ${grade(d.grade)} at ${formatShots(Number(d.shots))} shots${Number(d.photos) ? `, ${d.photos} photo${Number(d.photos) === 1 ? '' : 's'}` : ''}`;
		case 'surface.void':
			return `Surface inspection at ${formatShots(Number(d.shots))} shots (${text(d.zone)}) voided${reason(d)}`;
		case 'surface.correct': {
			const was = (d.was ?? {}) as Record<string, unknown>;
			const now = (d.now ?? {}) as Record<string, unknown>;
			return `Surface inspection corrected: ${grade(was.grade)} at ${formatShots(Number(was.shots))} shots → ${grade(now.grade)} at ${formatShots(Number(now.shots))} shots${reason(d)}`;
		}
		case 'cooling.circuit':
			return `Cooling circuit ${text(d.label)} added (${text(d.coolant)}, nominal ${text(d.nominalLpm)} L/min)`;
		case 'cooling.check':
			return `Cooling check of ${text(d.circuit)}: ${text(d.flowLpm)} L/min, ${text(d.pctOfNominal)} % of nominal${d.weak ? ' — weak' : ''}; leak test ${(LEAK_TEST_LABELS as Record<string, string>)[text(d.leak)]?.toLowerCase() ?? text(d.leak)}${d.unusualReason ? ` (unusual reading confirmed: ${text(d.unusualReason)})` : ''}`;
		case 'cooling.void':
			return `Cooling check of ${formatDate(text(d.checkedAt))} voided${reason(d)}`;
		case 'cooling.correct': {
			const was = (d.was ?? {}) as Record<string, unknown>;
			const now = (d.now ?? {}) as Record<string, unknown>;
			return `Cooling check corrected: ${text(was.flowLpm)} L/min, ${text(was.inletC)}/${text(was.outletC)} °C → ${text(now.flowLpm)} L/min, ${text(now.inletC)}/${text(now.outletC)} °C${reason(d)}`;
		}
		case 'booking.create':
			return `Booked on ${text(d.press)}${d.order ? ` for ${text(d.order)}` : ''}`;
		case 'booking.cancel':
			return `Booking cancelled${reason(d)}`;
		case 'booking.edit': {
			const after = (d.after ?? {}) as Record<string, unknown>;
			const fields = Object.keys(after).join(', ');
			return `Booking${d.order ? ` ${text(d.order)}` : ''} changed${fields ? `: ${fields}` : ''}`;
		}
		case 'photo.add':
			return `${Number(d.count) || 1} photo${Number(d.count) === 1 ? '' : 's'} added${d.to ? ` to ${text(d.to)}` : ''}`;
		case 'window.reserve':
			return `Service window set aside for the toolroom${d.kind ? ` (${jobKindLabel(text(d.kind)).toLowerCase()})` : ''} ${formatDateTime(text(d.startsAt))} – ${formatDateTime(text(d.endsAt))}${d.note ? `: ${text(d.note)}` : ''}`;
		case 'window.cancel':
			return `Service window called off${reason(d)}`;
		case 'window.start':
			return `Toolroom job ${text(d.job)} opened from a service window ${d.automatic ? 'at its start' : 'by hand'}`;
		case 'photo.share':
			return d.shared ? 'Photo shared with the owner' : 'Photo no longer shared with the owner';
		case 'owner.decision_asked': {
			const quote = describeQuote(
				typeof d.quotedHours === 'number' ? d.quotedHours : null,
				typeof d.quotedCost === 'number' ? d.quotedCost : null
			);
			return `Owner's decision asked: ${text(d.question)}${quote ? ` (${quote.toLowerCase()})` : ''}`;
		}
		case 'owner.decision_answered': {
			const answer =
				(OWNER_ANSWER_LABELS as Record<string, { word: string }>)[text(d.answer)]?.word ??
				'Answered';
			return `Owner answered: ${answer}${d.text ? ` — ${text(d.text)}` : ''} (asked: ${text(d.question)})`;
		}
		case 'photo.caption':
			return `Photo caption changed to “${text(d.caption)}”`;
		default:
			return `${AUDIT_ACTION_LABELS[h.action] ?? 'Change recorded'}${reason(d)}`;
	}
}

/** The record an entry is about, so a voided record's entries can be shown struck through. */
export function historyRecordKey(h: HistoryEntry): string | null {
	const d = h.detail;
	if (h.action === 'cooling.check' && typeof d.check === 'number') return `check:${d.check}`;
	if (h.action === 'surface.inspect' && typeof d.inspection === 'number') {
		return `inspection:${d.inspection}`;
	}
	if (h.action.startsWith('job.') && h.action !== 'job.void' && typeof d.job === 'string') {
		return `job:${d.job}`;
	}
	return null;
}
