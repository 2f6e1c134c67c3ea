/** Settings of the notice job, read from the environment in one place (app and scripts). */
export interface NoticeConfig {
	smtpUrl: string;
	from: string;
	origin: string;
	threshold: number;
	/** Cron expression for the daily run, or null when switched off. */
	cron: string | null;
}

export const NOTICE_DEFAULTS = {
	smtpUrl: 'smtp://127.0.0.1:2525',
	from: 'Castellan <castellan@localhost>',
	origin: 'http://localhost:3000',
	threshold: 0.9,
	cron: '0 6 * * *'
} as const;

type EnvLike = Record<string, string | undefined>;

/**
 * Reads SMTP_URL, MAIL_FROM, ORIGIN, NOTICE_THRESHOLD and NOTICE_CRON. A threshold outside
 * (0, 1] falls back to the default with a warning rather than stopping the server.
 */
export function readNoticeConfig(env: EnvLike): NoticeConfig {
	const rawThreshold = env.NOTICE_THRESHOLD?.trim();
	let threshold: number = NOTICE_DEFAULTS.threshold;
	if (rawThreshold) {
		const parsed = Number(rawThreshold);
		if (parsed > 0 && parsed <= 1) threshold = parsed;
		else {
			console.warn(
				`NOTICE_THRESHOLD must be a share above 0 and at most 1 (e.g. 0.9), not "${rawThreshold}"; using ${NOTICE_DEFAULTS.threshold}.`
			);
		}
	}
	const rawCron = env.NOTICE_CRON?.trim();
	return {
		smtpUrl: env.SMTP_URL?.trim() || NOTICE_DEFAULTS.smtpUrl,
		from: env.MAIL_FROM?.trim() || NOTICE_DEFAULTS.from,
		origin: (env.ORIGIN?.trim() || NOTICE_DEFAULTS.origin).replace(/\/+$/, ''),
		threshold,
		cron: rawCron?.toLowerCase() === 'off' ? null : rawCron || NOTICE_DEFAULTS.cron
	};
}
