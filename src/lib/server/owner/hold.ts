/**
 * Holding a die waiting for its owner's decision: the state move (with its booking consequences,
 * as any hand move) and the question to the owner (decisions.ts), then the mail sent soon.
 */
import type { DB } from '../db/connect';
import {
	describeStateChanges,
	moveDieState,
	type MoveResult,
	type StateDie
} from '../dies/state-change';
import { sendNoticesSoon } from '../notices/cron';
import { askOwnerDecision, type OwnerQuestion } from './decisions';

/**
 * Puts the die on hold waiting for its owner's decision and asks the owner: the move (with its
 * booking consequences, as any hand move), the question row, the audit entry and the owner's
 * e-mail (keyed by the question, so exactly once per hold). Refused, with nothing changed, while
 * an earlier question on the die is still open.
 */
export async function holdForOwnerDecision(
	db: DB,
	die: StateDie,
	ask: OwnerQuestion,
	reason: string,
	actorId: string,
	seenBlocked: number | null
): Promise<MoveResult & { ownersTold?: number }> {
	const open = await db
		.selectFrom('owner_decisions')
		.select('id')
		.where('die_id', '=', die.id)
		.where('answer', 'is', null)
		.executeTakeFirst();
	if (open) {
		return {
			ok: false,
			message:
				'An earlier question to the owner is still open on this die; wait for the answer before asking again.'
		};
	}
	// A die held already (for another reason, or before owners could be asked) stays as it is;
	// only the question is added.
	if (die.status === 'held') {
		const { queued } = await askOwnerDecision(db, die.id, ask, actorId);
		if (queued) sendNoticesSoon();
		const [consequence] = await describeStateChanges(db, die, ['held']);
		return { ok: true, consequence, queued: 0, ownersTold: queued };
	}
	const moved = await moveDieState(db, die, 'held', reason, actorId, seenBlocked);
	if (!moved.ok) return moved;
	const { queued } = await askOwnerDecision(db, die.id, ask, actorId);
	if (queued) sendNoticesSoon();
	return { ...moved, ownersTold: queued };
}
