// The notices area without its scheduler (cron.ts reads SvelteKit's $env and stays app-only).
export { findNoticeItems, LIFE_NOTICE_THRESHOLDS } from './find';
export {
	listNoticeRecipients,
	listSchedulerRecipients,
	queueJobCompletedMail,
	writeOutbox,
	type JobCompletedInput,
	type WriteResult
} from './outbox';
export { sendPending, backoffMs, DEFAULT_MAX_ATTEMPTS, type SendResult } from './send';
export { runNotices, type RunOptions, type RunResult } from './run';
export { composeDigest } from './digest';
export { outboxHealth, listOutbox, resendDelivery, resendAllFailed } from './admin';
export { readNoticeConfig, NOTICE_DEFAULTS } from './config';
export type * from './types';
