import { sql, type RawBuilder } from 'kysely';
import type { DB } from '../db/connect';
import { nowIso } from '../time';
import type { DeliveryState, NoticeKind, NoticeLevel } from './types';

export interface OutboxHealth {
	/** Waiting to go out (new, or retrying after a failure). */
	pending: number;
	/** Of those, rows that failed at least once. */
	retrying: number;
	/** Gave up after the attempt limit; an admin must resend. */
	failed: number;
	/** Delivery rows sent in the 24 h before `now`. */
	sentLastDay: number;
	/** When the last digest was accepted by the relay. */
	lastSentAt: string | null;
	/** Creation time of the oldest pending row. */
	oldestPendingAt: string | null;
	/** Most recent error on a pending or failed row. */
	lastError: string | null;
	/** One word for the plant overview. */
	status: 'ok' | 'retrying' | 'failing';
}

/** Rows meeting a condition, 0 for none (PostgreSQL does not sum booleans, so count a case). */
const countWhere = (condition: RawBuilder<unknown>) =>
	sql<number>`count(case when ${condition} then 1 end)`;

/** Outbox health for the plant overview and the outbox page. */
export async function outboxHealth(db: DB, now: string = nowIso()): Promise<OutboxHealth> {
	const dayAgo = new Date(Date.parse(now) - 86_400_000).toISOString();
	const [counts, last, error] = await Promise.all([
		db
			.selectFrom('notice_deliveries')
			.select([
				countWhere(sql`state = 'pending'`).as('pending'),
				countWhere(sql`state = 'pending' and attempts > 0`).as('retrying'),
				countWhere(sql`state = 'failed'`).as('failed'),
				countWhere(sql`state = 'sent' and sent_at >= ${dayAgo}`).as('sentLastDay'),
				sql<string | null>`min(case when state = 'pending' then created_at end)`.as(
					'oldestPendingAt'
				)
			])
			.executeTakeFirstOrThrow(),
		db
			.selectFrom('notice_digests')
			.select((eb) => eb.fn.max('sent_at').as('lastSentAt'))
			.executeTakeFirst(),
		db
			.selectFrom('notice_deliveries')
			.select('last_error')
			.where('state', 'in', ['pending', 'failed'])
			.where('last_error', 'is not', null)
			.orderBy('id', 'desc')
			.limit(1)
			.executeTakeFirst()
	]);
	const failed = Number(counts.failed);
	const retrying = Number(counts.retrying);
	return {
		pending: Number(counts.pending),
		retrying,
		failed,
		sentLastDay: Number(counts.sentLastDay),
		lastSentAt: last?.lastSentAt ?? null,
		oldestPendingAt: counts.oldestPendingAt,
		lastError: error?.last_error ?? null,
		status: failed > 0 ? 'failing' : retrying > 0 ? 'retrying' : 'ok'
	};
}

export interface OutboxQuery {
	state?: DeliveryState;
	/** Recipient or die number, partial. */
	q?: string;
	page: number;
	size: number;
}

export interface OutboxRow {
	id: number;
	recipient: string;
	state: DeliveryState;
	attempts: number;
	lastError: string | null;
	nextAttemptAt: string;
	createdAt: string;
	sentAt: string | null;
	digestId: string | null;
	kind: NoticeKind;
	level: NoticeLevel;
	subject: string;
	dieNumber: string;
}

/** One page of the outbox, newest first, with the total for pagination. */
export async function listOutbox(
	db: DB,
	query: OutboxQuery
): Promise<{ rows: OutboxRow[]; total: number }> {
	const q = query.q?.trim();
	const base = db
		.selectFrom('notice_deliveries as d')
		.innerJoin('notices as n', 'n.id', 'd.notice_id')
		.innerJoin('dies', 'dies.id', 'n.die_id')
		.$if(!!query.state, (b) => b.where('d.state', '=', query.state!))
		.$if(!!q, (b) => {
			// Lower-cased on both sides: SQLite's like ignores ASCII case, PostgreSQL's does not.
			const pattern = `%${q!.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
			return b.where((eb) =>
				eb.or([
					sql<boolean>`lower(d.recipient) like ${pattern} escape '\\'`,
					sql<boolean>`lower(dies.number) like ${pattern} escape '\\'`
				])
			);
		});
	const [rows, total] = await Promise.all([
		base
			.select([
				'd.id',
				'd.recipient',
				'd.state',
				'd.attempts',
				'd.last_error as lastError',
				'd.next_attempt_at as nextAttemptAt',
				'd.created_at as createdAt',
				'd.sent_at as sentAt',
				'd.digest_id as digestId',
				'n.kind',
				'n.level',
				'n.subject',
				'dies.number as dieNumber'
			])
			.orderBy('d.created_at', 'desc')
			.orderBy('d.id', 'desc')
			.limit(query.size)
			.offset((query.page - 1) * query.size)
			.execute(),
		base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
	]);
	return { rows, total: Number(total.n) };
}

/**
 * Puts a failed delivery back in the queue: pending, attempts from zero, due at once. Returns
 * false when the row does not exist or is not failed (nothing changed).
 */
export async function resendDelivery(db: DB, id: number, now: string = nowIso()): Promise<boolean> {
	const result = await db
		.updateTable('notice_deliveries')
		.set({ state: 'pending', attempts: 0, last_error: null, next_attempt_at: now, digest_id: null })
		.where('id', '=', id)
		.where('state', '=', 'failed')
		.executeTakeFirst();
	return Number(result.numUpdatedRows) === 1;
}

/** Puts every failed delivery back in the queue; returns how many. */
export async function resendAllFailed(db: DB, now: string = nowIso()): Promise<number> {
	const result = await db
		.updateTable('notice_deliveries')
		.set({ state: 'pending', attempts: 0, last_error: null, next_attempt_at: now, digest_id: null })
		.where('state', '=', 'failed')
		.executeTakeFirst();
	return Number(result.numUpdatedRows);
}
