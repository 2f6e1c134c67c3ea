import type { RetirementReason } from '../../domain';
/**
 * Moving a die to another state by hand, with what the move does said before it is made: the
 * press bookings it blocks or frees, the toolroom jobs that stay open. The same words go to the
 * planners through the outbox after the move.
 */
import type { DB } from '../db/connect';
import type { DieStatus } from '../db/schema';
import { formatDate } from '../../format';
import { DIE_STATUS_LABELS } from '../../labels';
import { stateBlocksBooking } from '../schedule/verdict';
import { listOpenToolroomJobs } from '../schedule/toolroom-hook';
import { queueDieStateMail } from '../notices/outbox';
import { sendNoticesSoon } from '../notices/cron';
import { nowIso } from '../time';
import { changeDieStatus } from './die-write';

export interface StateDie {
	id: number;
	number: string;
	status: DieStatus;
}

export interface StateConsequence {
	to: DieStatus;
	/** Coming press bookings (not cancelled, not yet ended). */
	bookings: number;
	/** True when the move changes whether the die can be booked; the planners are then told. */
	changesBooking: boolean;
	/** Bookings the move blocks (0 when it blocks none). */
	blocked: number;
	/** Plain sentences shown before the move and sent to the planners after it. */
	lines: string[];
}

function plural(n: number, word: string) {
	return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** What moving the die to each target state would do, from one look at its bookings and jobs. */
export async function describeStateChanges(
	db: DB,
	die: StateDie,
	targets: readonly DieStatus[],
	asOf = nowIso()
): Promise<StateConsequence[]> {
	if (targets.length === 0) return [];
	const [bookings, jobs] = await Promise.all([
		db
			.selectFrom('press_bookings')
			.select(['starts_at'])
			.where('die_id', '=', die.id)
			.where('cancelled_at', 'is', null)
			.where('ends_at', '>', asOf)
			.orderBy('starts_at')
			.execute(),
		listOpenToolroomJobs(db, [die.id])
	]);
	const count = bookings.length;
	const from = bookings.length ? formatDate(bookings[0].starts_at) : null;
	const blocksNow = stateBlocksBooking(die);
	return targets.map((to) => {
		const blocksThen = stateBlocksBooking({ number: die.number, status: to });
		const lines: string[] = [];
		const some = `${plural(count, 'press booking')} from ${from}`;
		if (blocksThen && !blocksNow) {
			lines.push(
				count
					? `${some} will be blocked.`
					: `No press booking is coming up; the die cannot be booked while ${DIE_STATUS_LABELS[to]}.`
			);
		} else if (blocksThen && blocksNow) {
			if (count) lines.push(`${some} stay blocked.`);
		} else if (!blocksThen && blocksNow) {
			lines.push(count ? `${some} can run again.` : 'The die can be booked again.');
		}
		if (to === 'retired') lines.push('Retiring is final: the die cannot change state again.');
		if (jobs.length && (to === 'ready' || to === 'running')) {
			lines.push(
				`Open toolroom ${jobs.length === 1 ? 'job' : 'jobs'} ${jobs.map((j) => j.number).join(', ')} ${jobs.length === 1 ? 'stays' : 'stay'} open.`
			);
		}
		const changesBooking = blocksThen !== blocksNow;
		if (changesBooking) lines.push('The production planners are told by e-mail.');
		return {
			to,
			bookings: count,
			changesBooking,
			blocked: blocksThen && !blocksNow ? count : 0,
			lines
		};
	});
}

export type MoveResult =
	| { ok: true; consequence: StateConsequence; queued: number }
	| { ok: false; message: string; consequence?: StateConsequence };

/**
 * Moves the die and, when the move changes whether it can be booked, tells the planners. When
 * the caller saw a different number of blocked bookings than there are now (a booking came in
 * meanwhile), nothing moves: the new consequence goes back to be seen first.
 */
export async function moveDieState(
	db: DB,
	die: StateDie & { partName?: string },
	to: DieStatus,
	reason: string,
	actorId: string,
	seenBlocked: number | null,
	retirementReason: RetirementReason | null = null
): Promise<MoveResult> {
	const at = nowIso();
	const [consequence] = await describeStateChanges(db, die, [to], at);
	if (seenBlocked !== null && seenBlocked !== consequence.blocked) {
		return {
			ok: false,
			consequence,
			message: `The press bookings changed since the page was opened: ${consequence.lines.join(' ')} Check and move again.`
		};
	}
	const result = await changeDieStatus(db, die, to, reason, actorId, retirementReason);
	if (!result.ok) return result;
	let queued = 0;
	if (consequence.changesBooking) {
		try {
			({ queued } = await queueDieStateMail(
				db,
				{
					dieNumber: die.number,
					from: DIE_STATUS_LABELS[die.status],
					to: DIE_STATUS_LABELS[to],
					reason,
					blocks: stateBlocksBooking({ number: die.number, status: to }),
					consequence: consequence.lines
						.filter((l) => !l.startsWith('The production planners'))
						.join(' ')
				},
				at
			));
			sendNoticesSoon();
		} catch (err) {
			// The move stands; the outbox failure is for the admin's outbox page and the log.
			console.error(`Could not queue the state-change mail for ${die.number}`, err);
		}
	}
	return { ok: true, consequence, queued };
}
