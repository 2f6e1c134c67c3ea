// Hostile die, part, customer and person names in Castellan's e-mails: the service-notice digest
// and the job-completed mail go through the real outbox and templates, the invitation through its
// template, and every HTML part must carry the text escaped. The plain-text parts may carry it
// as typed (a mail client never runs plain text), and no name can add a header line.
import nodemailer from 'nodemailer';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import type { OutgoingMail } from '../../src/lib/server/mail/transport';
import { composeDigest, type DigestEntry } from '../../src/lib/server/notices/digest';
import { queueJobCompletedMail } from '../../src/lib/server/notices/outbox';
import { runNotices } from '../../src/lib/server/notices/run';
import { sendPending } from '../../src/lib/server/notices/send';
import { composeInvitationMail } from '../../src/lib/server/owner/invitation-mail';

const NOW = '2026-03-02T06:00:00.000Z';
const ORIGIN = 'https://castellan.test';

const SCRIPT = '<script>alert(1)</script>';
const IMG = '"><img src=x onerror=alert(1)>';
const PART = `${SCRIPT} housing ${IMG}`;
const CUSTOMER = `Evil & Sons <b onmouseover=alert(2)>Castings</b> \u202Eedoc\u202C 🔩`;
const SUMMARY = `Core polished. <iframe src="javascript:alert(3)"></iframe> ${IMG}`;
/** Each markup payload as it must not appear in HTML, and as it must appear escaped. */
const RAW = [SCRIPT, '<img src=x', '<b onmouseover', '<iframe'];

/** Fails if any raw markup payload made it into the HTML unescaped. */
function expectEscapedHtml(html: string, ...texts: string[]) {
	for (const raw of RAW) expect(html).not.toContain(raw);
	for (const t of texts) expect(html).toContain(escapeForCheck(t));
}

// The escaping the templates promise (src/lib/server/mail/html.ts), written out independently.
function escapeForCheck(value: string): string {
	return value
		.replace(/&/g, '&amp;')
		.replace(/</g, '&lt;')
		.replace(/>/g, '&gt;')
		.replace(/"/g, '&quot;')
		.replace(/'/g, '&#39;');
}

/** A mailer that keeps what it would send. */
function captureMailer() {
	const sent: OutgoingMail[] = [];
	return {
		sent,
		async send(mail: OutgoingMail) {
			sent.push(mail);
			return { messageId: `<${sent.length}@castellan.test>` };
		}
	};
}

async function seedHostileDie(db: DB, number: string, totalShots: number) {
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', 'A380')
		.executeTakeFirstOrThrow();
	const customer = await db
		.insertInto('customers')
		.values({ code: 'EVIL', name: CUSTOMER, contact_email: null })
		.returning('id')
		.executeTakeFirstOrThrow();
	const die = await db
		.insertInto('dies')
		.values({
			number,
			part_name: PART,
			customer_id: customer.id,
			alloy_id: alloy.id,
			process: 'cold_chamber',
			cavities: 1,
			projected_area_cm2: 200,
			status: 'ready',
			total_shots: totalShots,
			expected_life_shots: null,
			retired_at: null
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	// Stress relief well past its 15 000-shot interval: the digest lists it as overdue.
	await db
		.insertInto('service_tasks')
		.values({
			die_id: die.id,
			kind: 'stress_relief',
			interval_shots: 15_000,
			interval_days: null,
			last_done_at: '2026-02-20T00:00:00.000Z',
			last_done_shots: 0,
			active: 1
		})
		.execute();
	for (const [id, email, role] of [
		['u-lead', 'lead@plant.test', 'toolroom_lead'],
		['u-plan', 'planner@plant.test', 'scheduler']
	] as const) {
		await db
			.insertInto('users')
			.values({
				id,
				email,
				name: email.split('@')[0],
				role,
				customer_id: null,
				password_hash: 'not-a-real-hash',
				active: 1,
				notices_enabled: 1
			})
			.execute();
	}
}

describe('hostile names in e-mails', () => {
	let db: DB;
	beforeEach(async () => {
		db = await openTestDatabase();
	});
	afterEach(async () => {
		await db.destroy();
	});

	it('escapes part and customer names in the service-notice digest sent by a notice run', async () => {
		await seedHostileDie(db, 'D-9501', 20_000);
		const mailer = captureMailer();
		const result = await runNotices(db, { now: NOW, mailer, origin: ORIGIN });
		expect(result.digests).toBe(1);
		const [mail] = mailer.sent;
		expect(mail.to).toBe('lead@plant.test');
		expect(mail.html).toBeDefined();
		expectEscapedHtml(mail.html!, PART, CUSTOMER);
		expect(mail.html).toContain('href="https://castellan.test/dies/D-9501"');
		// Plain text carries the names as typed; the subject carries no name at all.
		expect(mail.text).toContain(PART);
		expect(mail.subject).not.toMatch(/[<>\r\n]/);
	});

	it('escapes names and the summary in the job-completed mail to the planners', async () => {
		await seedHostileDie(db, 'D-9502', 100);
		const { queued } = await queueJobCompletedMail(
			db,
			{ dieNumber: 'D-9502', jobNumber: 'TJ-00042', summary: SUMMARY },
			NOW
		);
		expect(queued).toBe(1);
		const mailer = captureMailer();
		const result = await sendPending(db, mailer, NOW, { origin: ORIGIN });
		expect(result.sent).toBe(1);
		const [mail] = mailer.sent;
		expect(mail.to).toBe('planner@plant.test');
		expect(mail.subject).toBe('Castellan: D-9502 ready again · TJ-00042 closed');
		expectEscapedHtml(mail.html!, PART, CUSTOMER, `TJ-00042 closed: ${SUMMARY}`);
		expect(mail.text).toContain(SUMMARY);
	});

	it('escapes a hostile die number in the digest link and text', () => {
		// Die numbers are checked on entry; the template must not rely on it.
		const number = `D-1"><svg onload=alert(4)>`;
		const entry: DigestEntry = {
			level: 'ready_again',
			subject: 'x',
			dieNumber: number,
			payload: {
				kind: 'job_completed',
				dieNumber: number,
				partName: PART,
				customerName: CUSTOMER,
				jobNumber: 'TJ-00001',
				summary: SUMMARY
			}
		};
		const mail = composeDigest([entry], { origin: ORIGIN, asOf: NOW });
		expect(mail.html).not.toContain('<svg');
		expect(mail.html).toContain(
			`href="https://castellan.test/dies/D-1%22%3E%3Csvg%20onload%3Dalert(4)%3E"`
		);
		expectEscapedHtml(mail.html, PART, CUSTOMER);
	});

	it('escapes the invitation and keeps a line break in a name out of the headers', async () => {
		const mail = composeInvitationMail({
			name: `Mallory ${SCRIPT}`,
			email: 'mallory@evil.test',
			customerName: `${CUSTOMER}\r\nBcc: everyone@evil.test`,
			plantName: 'Kestrel Vale Diecast Works',
			link: 'https://castellan.test/invite/abc"def',
			expiresAt: '2026-03-05T06:00:00.000Z'
		});
		expectEscapedHtml(mail.html, `Mallory ${SCRIPT}`, CUSTOMER);
		expect(mail.html).toContain('href="https://castellan.test/invite/abc&quot;def"');

		// What would go on the wire: nodemailer folds the subject into one encoded header.
		const wire = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: '\n' });
		const info = await wire.sendMail({
			from: 'castellan@plant.test',
			to: 'mallory@evil.test',
			...mail
		});
		const headers = (info.message as Buffer).toString('utf8').split('\n\n')[0];
		expect(headers).not.toMatch(/^bcc:/im);
		expect(headers.match(/^subject:/gim)).toHaveLength(1);
	});
});
