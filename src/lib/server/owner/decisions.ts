/**
 * Owner decisions: the toolroom lead holds a die "waiting for the owner's decision" with a
 * question (and, optionally, the quoted repair hours and cost); the owner's contacts get an
 * e-mail and a decision card in the portal; the owner answers once (approve the repair, order a
 * replacement, retire, or a written reply); the answer goes to the toolroom leads by e-mail and
 * on the die page and is kept in the die's history (audit). The answer never changes the die's
 * state: the lead acts on it.
 *
 * One answer per question: a second answer is refused (the first stands; the owner writes to
 * the plant or the lead asks a new question). One open question per die at a time.
 *
 * Mail is queued in the outbox here; the routes ask for it to go out now (sendNoticesSoon), the
 * delivery tick sends it otherwise. Holding the die is in hold.ts (it moves the die's state).
 */
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { OwnerAnswer } from '../db/schema-owner';
import { writeAudit } from '../audit';
import { listOwnerRecipients } from '../notices/owner-life';
import { toStoredInstant, writeOutbox } from '../notices/outbox';
import type { NoticeItem, NoticeRecipient } from '../notices/types';
import { nowIso } from '../time';
import { OWNER_ANSWER_LABELS } from '../../labels';

export interface DecisionView {
	id: number;
	question: string;
	quotedHours: number | null;
	quotedCost: number | null;
	askedBy: string;
	askedAt: string;
	answer: OwnerAnswer | null;
	answerText: string | null;
	answeredBy: string | null;
	answeredAt: string | null;
}

function selectDecisions(db: DB) {
	return db
		.selectFrom('owner_decisions as d')
		.leftJoin('users as a', 'a.id', 'd.asked_by')
		.leftJoin('users as o', 'o.id', 'd.answered_by')
		.select([
			'd.id',
			'd.die_id as dieId',
			'd.question',
			'd.quoted_hours as quotedHours',
			'd.quoted_cost as quotedCost',
			'a.name as askedByName',
			'd.asked_at as askedAt',
			'd.answer',
			'd.answer_text as answerText',
			'o.name as answeredByName',
			'd.answered_at as answeredAt'
		]);
}

type DecisionRow = Awaited<ReturnType<ReturnType<typeof selectDecisions>['execute']>>[number];

const toView = (r: DecisionRow): DecisionView => ({
	id: r.id,
	question: r.question,
	quotedHours: r.quotedHours,
	quotedCost: r.quotedCost,
	askedBy: r.askedByName ?? 'The toolroom',
	askedAt: r.askedAt,
	answer: r.answer,
	answerText: r.answerText,
	answeredBy: r.answer ? (r.answeredByName ?? 'The owner') : null,
	answeredAt: r.answeredAt
});

/**
 * What a die page shows about decisions: the open question (if any) and the latest answered
 * one. The same for the plant's die page and the owner's.
 */
export async function loadDecisionCard(
	db: DB,
	dieId: number
): Promise<{ open: DecisionView | null; answered: DecisionView | null }> {
	const [open, answered] = await Promise.all([
		selectDecisions(db)
			.where('d.die_id', '=', dieId)
			.where('d.answer', 'is', null)
			.executeTakeFirst(),
		selectDecisions(db)
			.where('d.die_id', '=', dieId)
			.where('d.answer', 'is not', null)
			.orderBy('d.answered_at', 'desc')
			.orderBy('d.id', 'desc')
			.limit(1)
			.executeTakeFirst()
	]);
	return { open: open ? toView(open) : null, answered: answered ? toView(answered) : null };
}

/** The owner's dies with an open question, for the portal home. */
export async function listOpenDecisionsForOwner(db: DB, customerId: number) {
	const rows = await selectDecisions(db)
		.innerJoin('dies', 'dies.id', 'd.die_id')
		.select(['dies.number as dieNumber', 'dies.part_name as partName'])
		.where('dies.customer_id', '=', customerId)
		.where('d.answer', 'is', null)
		.orderBy('d.asked_at')
		.execute();
	return rows.map((r) => ({ dieNumber: r.dieNumber, partName: r.partName, ...toView(r) }));
}

export interface OwnerQuestion {
	question: string;
	quotedHours: number | null;
	quotedCost: number | null;
}

async function dieFacts(db: DB, dieId: number) {
	return db
		.selectFrom('dies')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select([
			'dies.id',
			'dies.number',
			'dies.part_name',
			'dies.customer_id',
			'customers.name as customer_name'
		])
		.where('dies.id', '=', dieId)
		.executeTakeFirstOrThrow();
}

/** Records the question (audited) and queues the owner's e-mail; see holdForOwnerDecision. */
export async function askOwnerDecision(
	db: DB,
	dieId: number,
	ask: OwnerQuestion,
	actorId: string,
	at = nowIso()
): Promise<{ decisionId: number; queued: number }> {
	const asked = toStoredInstant(at);
	const question = ask.question.trim();
	const decisionId = await writeTransaction(db, async (trx) => {
		const row = await trx
			.insertInto('owner_decisions')
			.values({
				die_id: dieId,
				question,
				quoted_hours: ask.quotedHours,
				quoted_cost: ask.quotedCost,
				asked_by: actorId,
				asked_at: asked
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'owner.decision_asked',
				dieId,
				detail: {
					decision: row.id,
					question,
					quotedHours: ask.quotedHours,
					quotedCost: ask.quotedCost
				}
			},
			asked
		);
		return row.id;
	});
	const [die, asker] = await Promise.all([
		dieFacts(db, dieId),
		db.selectFrom('users').select('name').where('id', '=', actorId).executeTakeFirst()
	]);
	const item: NoticeItem = {
		key: `decision:${decisionId}`,
		kind: 'owner_decision',
		level: 'decision_asked',
		dieId,
		subject: `${die.number} is held until you decide`,
		payload: {
			kind: 'owner_decision',
			dieNumber: die.number,
			partName: die.part_name,
			customerName: die.customer_name,
			decisionId,
			question,
			quotedHours: ask.quotedHours,
			quotedCost: ask.quotedCost,
			askedBy: asker?.name ?? 'The toolroom'
		}
	};
	const recipients = (await listOwnerRecipients(db, [die.customer_id])).get(die.customer_id) ?? [];
	const { deliveries } = await writeOutbox(db, [item], recipients, asked);
	return { decisionId, queued: deliveries };
}

export type AnswerResult =
	{ ok: true; queued: number } | { ok: false; status: 400 | 404 | 409; message: string };

/**
 * The owner's answer. Only the die's own customer may answer: another customer's die, or a
 * question not on this die, is 404 (the same as nothing there). A question answered already is
 * 409 and keeps its first answer.
 */
export async function answerOwnerDecision(
	db: DB,
	input: {
		customerId: number;
		dieNumber: string;
		decisionId: number;
		answer: OwnerAnswer;
		text: string;
		userId: string;
	},
	at = nowIso()
): Promise<AnswerResult> {
	const answeredAt = toStoredInstant(at);
	const row = await selectDecisions(db)
		.innerJoin('dies', 'dies.id', 'd.die_id')
		.select(['dies.customer_id as customerId'])
		.where('d.id', '=', input.decisionId)
		.where('dies.number', '=', input.dieNumber)
		.where('dies.customer_id', '=', input.customerId)
		.executeTakeFirst();
	if (!row) return { ok: false, status: 404, message: 'There is no such question on your die.' };
	const text = input.text.trim() || null;
	if (input.answer === 'write_back' && !text) {
		return { ok: false, status: 400, message: 'Write your reply.' };
	}
	const done = await writeTransaction(db, async (trx) => {
		// The `answer is null` guard makes a second answer (two tabs, two people) change nothing.
		const updated = await trx
			.updateTable('owner_decisions')
			.set({
				answer: input.answer,
				answer_text: text,
				answered_by: input.userId,
				answered_at: answeredAt
			})
			.where('id', '=', input.decisionId)
			.where('answer', 'is', null)
			.executeTakeFirst();
		if (Number(updated.numUpdatedRows) !== 1) return false;
		await writeAudit(
			trx,
			{
				userId: input.userId,
				action: 'owner.decision_answered',
				dieId: row.dieId,
				detail: {
					decision: input.decisionId,
					question: row.question,
					answer: input.answer,
					text
				}
			},
			answeredAt
		);
		return true;
	});
	if (!done) {
		const first = (await loadDecisionCard(db, row.dieId)).answered;
		const by = first && first.id === input.decisionId ? ` by ${first.answeredBy}` : '';
		return {
			ok: false,
			status: 409,
			message: `This question was already answered${by}; the first answer stands. Write to the plant to change it.`
		};
	}
	const [die, owner, leads] = await Promise.all([
		dieFacts(db, row.dieId),
		db.selectFrom('users').select('name').where('id', '=', input.userId).executeTakeFirst(),
		listAnswerRecipients(db, row.dieId, input.decisionId)
	]);
	const answerWords = OWNER_ANSWER_LABELS[input.answer].word;
	const item: NoticeItem = {
		key: `decision-answer:${input.decisionId}`,
		kind: 'owner_answer',
		level: 'owner_answered',
		dieId: row.dieId,
		subject: `${die.number} · the owner answered: ${answerWords}`,
		payload: {
			kind: 'owner_answer',
			dieNumber: die.number,
			partName: die.part_name,
			customerName: die.customer_name,
			decisionId: input.decisionId,
			question: row.question,
			answer: answerWords,
			answerText: text,
			answeredBy: `${owner?.name ?? 'The owner'} (${die.customer_name})`
		}
	};
	const { deliveries } = await writeOutbox(db, [item], leads, answeredAt);
	return { ok: true, queued: deliveries };
}

/**
 * Who hears the owner's answer: the lead who asked (while active; the answer is a reply to
 * them) and every active toolroom lead with notices switched on.
 */
async function listAnswerRecipients(
	db: DB,
	dieId: number,
	decisionId: number
): Promise<NoticeRecipient[]> {
	const [asker, leads] = await Promise.all([
		db
			.selectFrom('owner_decisions as d')
			.innerJoin('users as u', 'u.id', 'd.asked_by')
			.select(['u.id', 'u.email', 'u.name'])
			.where('d.id', '=', decisionId)
			.where('d.die_id', '=', dieId)
			.where('u.active', '=', 1)
			.executeTakeFirst(),
		db
			.selectFrom('users')
			.select(['id', 'email', 'name'])
			.where('role', '=', 'toolroom_lead')
			.where('active', '=', 1)
			.where('notices_enabled', '=', 1)
			.orderBy('email')
			.execute()
	]);
	const list: NoticeRecipient[] = leads.map((l) => ({
		email: l.email,
		name: l.name,
		userId: l.id
	}));
	if (asker && !list.some((l) => l.userId === asker.id)) {
		list.unshift({ email: asker.email, name: asker.name, userId: asker.id });
	}
	return list;
}
