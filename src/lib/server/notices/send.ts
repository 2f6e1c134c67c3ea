import { randomUUID } from 'node:crypto';
import type { DB } from '../db/connect';
import { inWriteTransaction } from '../db/session';
import type { Mailer } from '../mail/transport';
import { findDieConcerns } from './concerns';
import { composeDigest, type ComposedMail, type DigestEntry } from './digest';
import { mailFooterFor, plantIdentity } from '../settings/plant-identity';
import { toStoredInstant } from './outbox';
import { composeOwnerMail } from './owner-mail';
import { OWNER_NOTICE_KINDS, type NoticeLevel, type NoticePayload } from './types';

/** Attempts before a delivery is marked failed and left to an admin. */
export const DEFAULT_MAX_ATTEMPTS = 5;
/** First retry after this long; each further failure doubles it (15 min, 30, 60, 120). */
export const BACKOFF_BASE_MS = 15 * 60_000;
/** Longest wait between two attempts. */
export const BACKOFF_MAX_MS = 6 * 3_600_000;
/**
 * How long a sender owns the rows it claimed. Far beyond the mailer's own timeouts; if the
 * process dies mid-send, the rows are free again after this and go out once more (at least once
 * towards the relay, never lost).
 */
export const CLAIM_LEASE_MS = 10 * 60_000;

export interface SendOptions {
	/** Base URL for links in the mail. */
	origin: string;
	maxAttempts?: number;
}

export interface SendResult {
	/** Digest e-mails the relay accepted. */
	digests: number;
	/** Delivery rows marked sent. */
	sent: number;
	/** Rows left pending after a failure, to be retried after their back-off. */
	retrying: number;
	/** Rows that reached the attempt limit in this run and were marked failed. */
	failed: number;
	/** One line per digest that could not be sent. */
	errors: string[];
}

/** Wait after the n-th failed attempt (n ≥ 1): base × 2^(n−1), capped. */
export function backoffMs(failedAttempts: number): number {
	return Math.min(BACKOFF_MAX_MS, BACKOFF_BASE_MS * 2 ** Math.max(0, failedAttempts - 1));
}

interface ClaimedRow {
	id: number;
	recipient: string;
	attempts: number;
	level: NoticeLevel;
	subject: string;
	die_number: string;
	payload: string;
}

interface Claim {
	digestId: string;
	recipient: string;
	/** Items for a die's owner go in their own mail (owner portal links, owner words). */
	owner: boolean;
	rows: ClaimedRow[];
}

/** 1 when the notice `n` goes to a die's owner, else 0 (a number on both engines). */
const OWNER_FLAG_SQL = `case when n.kind in (${OWNER_NOTICE_KINDS.map((k) => `'${k}'`).join(',')}) then 1 else 0 end`;

/**
 * Takes every pending row whose time has come, one digest per recipient, in one write
 * transaction under the notices lock: each row gets the digest's id and a lease, so another
 * sender (a second process, an overlapping run) waits for the lock and then skips it.
 */
async function claimDue(db: DB, at: string): Promise<Claim[]> {
	const lease = new Date(Date.parse(at) + CLAIM_LEASE_MS).toISOString();
	return inWriteTransaction(db, { lock: 'notices' }, async (s) => {
		const recipients = await s.all<{ recipient: string; owner: number }>(
			`select distinct d.recipient, ${OWNER_FLAG_SQL} as owner
			   from notice_deliveries d join notices n on n.id = d.notice_id
			  where d.state = 'pending' and d.next_attempt_at <= ? order by d.recipient, owner`,
			[at]
		);
		const claims: Claim[] = [];
		for (const { recipient, owner } of recipients) {
			const digestId = randomUUID();
			await s.run(
				`update notice_deliveries set digest_id = ?, next_attempt_at = ?
				  where recipient = ? and state = 'pending' and next_attempt_at <= ?
				    and (select ${OWNER_FLAG_SQL} from notices n
				          where n.id = notice_deliveries.notice_id) = ?`,
				[digestId, lease, recipient, at, owner]
			);
			const rows = await s.all<ClaimedRow>(
				`select d.id, d.recipient, d.attempts, n.level, n.subject, dies.number as die_number,
				        n.payload
				   from notice_deliveries d
				   join notices n on n.id = d.notice_id
				   join dies on dies.id = n.die_id
				  where d.digest_id = ? and d.state = 'pending' order by d.id`,
				[digestId]
			);
			claims.push({ digestId, recipient, owner: Number(owner) === 1, rows });
		}
		return claims;
	});
}

async function markSent(
	db: DB,
	claim: Claim,
	subject: string,
	messageId: string,
	at: string
): Promise<number> {
	return inWriteTransaction(db, { lock: 'notices' }, async (s) => {
		const { changes } = await s.run(
			`update notice_deliveries
			    set state = 'sent', sent_at = ?, attempts = attempts + 1, last_error = null
			  where digest_id = ? and state = 'pending'`,
			[at, claim.digestId]
		);
		await s.run(
			`insert into notice_digests (id, recipient, subject, item_count, message_id, sent_at)
			 values (?, ?, ?, ?, ?, ?)`,
			[claim.digestId, claim.recipient, subject, changes, messageId, at]
		);
		return changes;
	});
}

async function markFailed(
	db: DB,
	claim: Claim,
	message: string,
	at: string,
	maxAttempts: number
): Promise<{ retrying: number; failed: number }> {
	const error = message.slice(0, 1000);
	return inWriteTransaction(db, { lock: 'notices' }, async (s) => {
		let retrying = 0;
		let failed = 0;
		const current = await s.all<{ id: number; attempts: number }>(
			`select id, attempts from notice_deliveries where digest_id = ? and state = 'pending'`,
			[claim.digestId]
		);
		for (const row of current) {
			const attempts = row.attempts + 1;
			const giveUp = attempts >= maxAttempts;
			const next = new Date(Date.parse(at) + backoffMs(attempts)).toISOString();
			await s.run(
				`update notice_deliveries
				    set attempts = ?, last_error = ?, state = ?, next_attempt_at = ?, digest_id = null
				  where id = ?`,
				[attempts, error, giveUp ? 'failed' : 'pending', next, row.id]
			);
			if (giveUp) failed++;
			else retrying++;
		}
		return { retrying, failed };
	});
}

/** A claimed row as the digest reads it; a big digest lists only its worst items, so parse late. */
function toDigestEntry(row: ClaimedRow): DigestEntry {
	let payload: NoticePayload | undefined;
	return {
		level: row.level,
		subject: row.subject,
		dieNumber: row.die_number,
		get payload() {
			payload ??= JSON.parse(row.payload) as NoticePayload;
			return payload;
		}
	};
}

/**
 * Sends every pending delivery whose time has come: one digest e-mail per recipient. Rows are
 * marked sent in one transaction once the relay accepted the mail; a failure leaves them pending
 * with the error and an exponential back-off, and after `maxAttempts` failures marks them failed.
 */
export async function sendPending(
	db: DB,
	mailer: Pick<Mailer, 'send'>,
	now: string,
	options: SendOptions
): Promise<SendResult> {
	const at = toStoredInstant(now);
	const maxAttempts = options.maxAttempts ?? DEFAULT_MAX_ATTEMPTS;
	const result: SendResult = { digests: 0, sent: 0, retrying: 0, failed: 0, errors: [] };
	const claims = await claimDue(db, at);
	const plant = claims.length ? await plantIdentity(db) : null;

	for (const claim of claims) {
		let mail: ComposedMail;
		let messageId: string;
		try {
			const entries = claim.rows.map(toDigestEntry);
			const plantFooter = plant ? mailFooterFor(plant) : undefined;
			if (claim.owner) {
				mail = composeOwnerMail(entries, { origin: options.origin, asOf: at, plantFooter });
			} else {
				const dies = [...new Set(entries.map((e) => e.dieNumber))];
				const concerns = await findDieConcerns(db, dies);
				mail = composeDigest(entries, {
					origin: options.origin,
					asOf: at,
					concerns,
					plantFooter
				});
			}
			({ messageId } = await mailer.send({
				fromName: plant?.name,
				to: claim.recipient,
				...mail
			}));
		} catch (error) {
			const message = error instanceof Error ? error.message : String(error);
			const outcome = await markFailed(db, claim, message, at, maxAttempts);
			result.retrying += outcome.retrying;
			result.failed += outcome.failed;
			result.errors.push(message);
			continue;
		}
		result.sent += await markSent(db, claim, mail.subject, messageId, at);
		result.digests++;
	}
	return result;
}
