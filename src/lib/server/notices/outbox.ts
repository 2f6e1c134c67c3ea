import type { DB } from '../db/connect';
import { inWriteTransaction } from '../db/session';
import type { Role } from '../db/schema';
import { nowIso } from '../time';
import type { NoticeItem, NoticeRecipient } from './types';

export interface WriteResult {
	/** Items new to the outbox (a key seen before writes nothing). */
	notices: number;
	/** Delivery rows written for those items, one per recipient. */
	deliveries: number;
}

/** Normalises any instant to the one stored form, so text comparison orders instants. */
export function toStoredInstant(instant: string | Date): string {
	const date = instant instanceof Date ? instant : new Date(instant);
	if (Number.isNaN(date.getTime())) throw new RangeError(`Not a date and time: ${String(instant)}`);
	return date.toISOString();
}

async function listActiveWithNotices(db: DB, roles: Role[]): Promise<NoticeRecipient[]> {
	const rows = await db
		.selectFrom('users')
		.select(['id', 'email', 'name'])
		.where('role', 'in', roles)
		.where('active', '=', 1)
		.where('notices_enabled', '=', 1)
		.orderBy('email')
		.execute();
	return rows.map((r) => ({ email: r.email, name: r.name, userId: r.id }));
}

/** Who gets service notices: active toolroom leads and toolmakers with notices switched on. */
export function listNoticeRecipients(db: DB): Promise<NoticeRecipient[]> {
	return listActiveWithNotices(db, ['toolroom_lead', 'toolmaker']);
}

/** Who hears that a die is ready again: active production planners with notices switched on. */
export function listSchedulerRecipients(db: DB): Promise<NoticeRecipient[]> {
	return listActiveWithNotices(db, ['scheduler']);
}

/**
 * Writes items and their deliveries in one write transaction under the notices lock. The item
 * key is unique, so an item already in the outbox (a second run, a restart, another process)
 * adds nothing; only a new item gets delivery rows. With nobody to tell, nothing is written, so
 * items stay news until someone switches notices on.
 */
export async function writeOutbox(
	db: DB,
	items: readonly NoticeItem[],
	recipients: readonly NoticeRecipient[],
	now: string
): Promise<WriteResult> {
	if (items.length === 0 || recipients.length === 0) return { notices: 0, deliveries: 0 };
	const at = toStoredInstant(now);
	// The lock makes two processes queue, not fail: SQLite takes its write lock up front, and on
	// PostgreSQL the second writer waits and then sees the first one's keys.
	return inWriteTransaction(db, { lock: 'notices' }, async (s) => {
		let notices = 0;
		let deliveries = 0;
		for (const item of items) {
			// Most items of a daily run are old news: a key probe is cheaper than an insert that
			// the unique index turns away after the payload was serialised.
			if (await s.get('select 1 as one from notices where notice_key = ?', [item.key])) continue;
			const row = await s.get<{ id: number }>(
				`insert into notices (notice_key, kind, level, die_id, subject, payload, created_at)
				 values (?, ?, ?, ?, ?, ?, ?)
				 on conflict (notice_key) do nothing
				 returning id`,
				[
					item.key,
					item.kind,
					item.level,
					item.dieId,
					item.subject,
					JSON.stringify(item.payload),
					at
				]
			);
			if (!row) continue;
			notices++;
			for (const r of recipients) {
				const { changes } = await s.run(
					`insert into notice_deliveries (notice_id, recipient, user_id, next_attempt_at, created_at)
					 values (?, ?, ?, ?, ?)
					 on conflict (notice_id, recipient) do nothing`,
					[row.id, r.email, r.userId, at, at]
				);
				deliveries += changes;
			}
		}
		return { notices, deliveries };
	});
}

export interface JobCompletedInput {
	dieNumber: string;
	/** e.g. `TJ-00042`. */
	jobNumber: string;
	/** One or two plain sentences on what was done; shown escaped. */
	summary: string;
}

/**
 * Queues the "die is ready again" mail to the production planners after a toolroom job was
 * closed; it goes out with the next send (the delivery tick, a notice run or
 * `sendNoticesSoon()`). Pass the job's closed-at time as `now`: the key is the job and that
 * instant, so calling twice for one closing queues once, while a job reopened and closed again
 * is news again. Returns the number of delivery rows queued (0 when no planner has notices on).
 */
export async function queueJobCompletedMail(
	db: DB,
	{ dieNumber, jobNumber, summary }: JobCompletedInput,
	now: string = nowIso()
): Promise<{ queued: number }> {
	const die = await db
		.selectFrom('dies')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select(['dies.id', 'dies.number', 'dies.part_name', 'customers.name as customer_name'])
		.where('dies.number', '=', dieNumber)
		.executeTakeFirst();
	if (!die)
		throw new Error(`No die ${dieNumber}: the completion mail for ${jobNumber} was not queued.`);
	const closedAt = toStoredInstant(now);
	const item: NoticeItem = {
		key: `job:${jobNumber}:${closedAt}`,
		kind: 'job_completed',
		level: 'ready_again',
		dieId: die.id,
		subject: `${die.number} ready again · ${jobNumber} closed`,
		payload: {
			kind: 'job_completed',
			dieNumber: die.number,
			partName: die.part_name,
			customerName: die.customer_name,
			jobNumber,
			summary: summary.trim()
		}
	};
	const recipients = await listSchedulerRecipients(db);
	const { deliveries } = await writeOutbox(db, [item], recipients, closedAt);
	return { queued: deliveries };
}

export interface DieStateInput {
	dieNumber: string;
	/** State words as the app shows them, e.g. "Ready", "Held". */
	from: string;
	to: string;
	reason: string;
	/** True when the new state blocks press bookings. */
	blocks: boolean;
	/** What the move does to the die's bookings, as stated on the die page before the move. */
	consequence: string;
}

/**
 * Queues the "die moved" mail to the production planners after a hand move that changes whether
 * the die can be booked (level not_bookable, or ready_again when it frees the die). The key is
 * the die and the instant of the move, so one move queues once.
 */
export async function queueDieStateMail(
	db: DB,
	input: DieStateInput,
	now: string = nowIso()
): Promise<{ queued: number }> {
	const die = await db
		.selectFrom('dies')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select(['dies.id', 'dies.number', 'dies.part_name', 'customers.name as customer_name'])
		.where('dies.number', '=', input.dieNumber)
		.executeTakeFirst();
	if (!die) throw new Error(`No die ${input.dieNumber}: the state-change mail was not queued.`);
	const at = toStoredInstant(now);
	const item: NoticeItem = {
		key: `state:${die.id}:${at}`,
		kind: 'die_state',
		level: input.blocks ? 'not_bookable' : 'ready_again',
		dieId: die.id,
		subject: `${die.number} moved to ${input.to}${input.blocks ? ' · cannot be booked' : ' · can be booked again'}`,
		payload: {
			kind: 'die_state',
			dieNumber: die.number,
			partName: die.part_name,
			customerName: die.customer_name,
			from: input.from,
			to: input.to,
			reason: input.reason.trim(),
			consequence: input.consequence
		}
	};
	const recipients = await listSchedulerRecipients(db);
	const { deliveries } = await writeOutbox(db, [item], recipients, at);
	return { queued: deliveries };
}
