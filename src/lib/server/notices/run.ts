import type { DB } from '../db/connect';
import type { Mailer } from '../mail/transport';
import { findNoticeItems } from './find';
import { listNoticeRecipients, toStoredInstant, writeOutbox } from './outbox';
import { findOwnerLifeItems, listOwnerRecipients } from './owner-life';
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
	/** Items for the plant's staff that stand today (new or already told). */
	items: number;
	/** Items for dies' owners that stand today (life points, reorder-by). */
	ownerItems: number;
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
	const [staffItems, recipients, ownerGroups] = await Promise.all([
		findNoticeItems(db, now, options.threshold ?? 0.9),
		listNoticeRecipients(db),
		findOwnerLifeItems(db, now)
	]);
	const written = await writeOutbox(db, staffItems, recipients, now);
	// Each owner hears about its own dies only, so their items are written customer by customer.
	const owners = await listOwnerRecipients(
		db,
		ownerGroups.map((g) => g.customerId)
	);
	let ownerItems = 0;
	for (const group of ownerGroups) {
		ownerItems += group.items.length;
		const w = await writeOutbox(db, group.items, owners.get(group.customerId) ?? [], now);
		written.notices += w.notices;
		written.deliveries += w.deliveries;
	}
	const sent = await sendPending(db, options.mailer, now, {
		origin: options.origin,
		maxAttempts: options.maxAttempts
	});
	return {
		items: staffItems.length,
		ownerItems,
		written: written.notices,
		queued: written.deliveries,
		recipients: recipients.length,
		...sent
	};
}
