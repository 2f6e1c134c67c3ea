// One notice run now (or at --now), outside the server's schedule:
//   npm run notices:run [-- --now 2026-03-02T06:00:00Z]
// Reads DATABASE_URL or DATABASE_PATH, SMTP_URL, MAIL_FROM, ORIGIN and NOTICE_THRESHOLD like the server does.
// Exit code 1 when a digest could not be sent (its rows stay pending and are retried later).
import { createMailer } from '../src/lib/server/mail/transport';
import { readNoticeConfig } from '../src/lib/server/notices/config';
import { runNotices } from '../src/lib/server/notices/run';
import { fail, openMigratedDatabase, parseCli, shownTarget } from './lib/cli';

const USAGE = 'npm run notices:run [-- --now <ISO date and time>]';
const { values } = parseCli(
	{ now: { type: 'string' }, help: { type: 'boolean', short: 'h' } },
	USAGE
);
if (values.help) {
	console.log(`Usage: ${USAGE}`);
	process.exit(0);
}
const now = values.now ? new Date(values.now as string) : new Date();
if (Number.isNaN(now.getTime())) fail(`--now is not a date and time: ${values.now}`, USAGE);

const config = readNoticeConfig(process.env);
const db = await openMigratedDatabase();
const mailer = createMailer({ smtpUrl: config.smtpUrl, from: config.from });
let exitCode = 0;
try {
	const r = await runNotices(db, {
		now: now.toISOString(),
		mailer,
		origin: config.origin,
		threshold: config.threshold
	});
	console.log(`Notice run at ${now.toISOString()} on ${shownTarget()}`);
	console.log(`  items standing      ${r.items}`);
	console.log(
		`  new in the outbox   ${r.written} (${r.queued} deliveries, ${r.recipients} recipients)`
	);
	console.log(
		`  digests sent        ${r.digests} (${r.sent} items) via ${config.smtpUrl.replace(/\/\/[^@/]*@/, '//')}`
	);
	console.log(`  left to retry       ${r.retrying}`);
	console.log(`  marked failed       ${r.failed}`);
	for (const error of r.errors) console.error(`  error: ${error}`);
	if (r.errors.length) exitCode = 1;
} finally {
	mailer.close();
	await db.destroy();
}
process.exit(exitCode);
