import type { DB } from '../db/connect';
import type { Mailer } from '../mail/transport';
import { findNoticeItems } from './find';
import { listNoticeRecipients, toStoredInstant, writeOutbox } from './outbox';
import { sendPending, type SendResult } from './send';

export interface RunOptions {
	/** The run's clock; tests pass a fixed instant. */
	now: string;
	mailer: Pick<Mailer, 'send'>;
	/** Base URL for links in the mail, e.g. the app's ORIGIN. */
	origin: string;
	/** Share of a service interval from which a task is "coming up"; default 0.9. */
	threshold?: number;
	maxAttempts?: number;
}

export interface RunResult extends SendResult {
	/** Items that stand today (new or already told). */
	items: number;
	/** Of those, items new to the outbox. */
	written: number;
	/** Delivery rows queued for the new items. */
	queued: number;
	recipients: number;
}

/**
 * One notice run: find what stands today, write what is new to the outbox, send every pending
 * delivery whose time has come (new ones and earlier failures past their back-off).
 */
export async function runNotices(db: DB, options: RunOptions): Promise<RunResult> {
	const now = toStoredInstant(options.now);
	const [items, recipients] = await Promise.all([
		findNoticeItems(db, now, options.threshold ?? 0.9),
		listNoticeRecipients(db)
	]);
	const written = await writeOutbox(db, items, recipients, now);
	const sent = await sendPending(db, options.mailer, now, {
		origin: options.origin,
		maxAttempts: options.maxAttempts
	});
	return {
		items: items.length,
		written: written.notices,
		queued: written.deliveries,
		recipients: recipients.length,
		...sent
	};
}
