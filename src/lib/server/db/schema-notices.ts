// Tables of the notices area; added to the Database interface in schema.ts.
//
// The outbox has two levels so that one item ("D-0107 stress relief is due") is written once,
// whatever the number of runs or processes, while each recipient's delivery of it keeps its own
// state: `notices` holds the item under a unique key per (die, task, cycle, state), and
// `notice_deliveries` holds one row per (item, recipient) that the digest sender claims, sends and
// marks sent. `notice_digests` records each e-mail that the relay accepted.
import type { Generated, Selectable } from 'kysely';

/** What a notice is about. */
export type NoticeKind =
	| 'service'
	| 'life'
	| 'job_completed'
	| 'die_state'
	| 'owner_life'
	| 'owner_decision'
	| 'owner_answer';

/**
 * How bad it is, the digest's grouping, worst first: service task states, die life thresholds,
 * "ready again" after a toolroom job was closed (or a die moved back by hand), and "not
 * bookable" when a die was moved to a state that blocks its press bookings. The owner's items:
 * life 80 % / 95 % and reorder due (owner_life), a decision asked (owner_decision), and the
 * owner's answer told to the toolroom leads (owner_answer, level owner_answered).
 */
export type NoticeLevel =
	| 'overdue'
	| 'due'
	| 'coming_up'
	| 'life_100'
	| 'life_90'
	| 'ready_again'
	| 'not_bookable'
	| 'life_80'
	| 'life_95'
	| 'reorder_due'
	| 'decision_asked'
	| 'owner_answered';

/** Delivery state of one item to one recipient. */
export type DeliveryState = 'pending' | 'sent' | 'failed';

export interface NoticesTable {
	id: Generated<number>;
	/** e.g. `svc:{taskId}:{lastDoneAt}:{state}`, `life:{dieId}:{expectedLife}:{90|100}`. */
	notice_key: string;
	kind: NoticeKind;
	level: NoticeLevel;
	die_id: number;
	/** One line for lists and subjects, e.g. "D-0107 · Stress relief · Due". */
	subject: string;
	/** JSON text: what the e-mail shows, frozen when the item was written. */
	payload: string;
	created_at: string;
}

export interface NoticeDeliveriesTable {
	id: Generated<number>;
	notice_id: number;
	/** E-mail address the item goes to. */
	recipient: string;
	/** The user behind the address; null for a plain address (e.g. a customer contact). */
	user_id: string | null;
	state: Generated<DeliveryState>;
	attempts: Generated<number>;
	last_error: string | null;
	/** Not claimed before this instant: back-off after a failure, or a sender's lease. */
	next_attempt_at: string;
	/** The digest that claimed the row (while sending) or carried it (once sent). */
	digest_id: string | null;
	created_at: string;
	sent_at: string | null;
}

export interface NoticeDigestsTable {
	/** Random id, also the claim on the rows while the e-mail is on its way. */
	id: string;
	recipient: string;
	subject: string;
	item_count: number;
	message_id: string | null;
	sent_at: string;
}

/** One row per scheduled slot of a cron job that some process took (see notices/run-slots.ts). */
export interface JobRunsTable {
	/** Task name and the slot's instant, e.g. `castellan-notices:2026-03-02T05:00:00.000Z`. */
	run_key: string;
	/** Which process took it: host name and process id. */
	taken_by: string;
	taken_at: string;
	finished_at: string | null;
}

export interface NoticesTables {
	notices: NoticesTable;
	notice_deliveries: NoticeDeliveriesTable;
	notice_digests: NoticeDigestsTable;
	job_runs: JobRunsTable;
}

export type Notice = Selectable<NoticesTable>;
export type NoticeDelivery = Selectable<NoticeDeliveriesTable>;
export type NoticeDigest = Selectable<NoticeDigestsTable>;
