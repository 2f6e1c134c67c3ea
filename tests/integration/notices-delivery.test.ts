import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { startFakeMail, type FakeMail } from '../../fakes/mail/server';
import {
	migrateToLatest,
	openDatabase,
	openTestDatabase,
	type DB
} from '../../src/lib/server/db/connect';
import { createMailer, type Mailer } from '../../src/lib/server/mail/transport';
import {
	findNoticeItems,
	listNoticeRecipients,
	outboxHealth,
	resendDelivery,
	runNotices,
	sendPending,
	writeOutbox
} from '../../src/lib/server/notices';
import { BACKOFF_BASE_MS, CLAIM_LEASE_MS } from '../../src/lib/server/notices/send';
import {
	at,
	closedPort,
	deliveryStates,
	diesIn,
	mailFor,
	NOW,
	ORIGIN,
	seedPlant,
	TOOLROOM_RECIPIENTS
} from './notices-support';

let mail: FakeMail;
let mailer: Mailer;
let deadMailer: Mailer;

beforeAll(async () => {
	mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
	mailer = createMailer({
		smtpUrl: `smtp://127.0.0.1:${mail.smtpPort}`,
		from: 'Castellan <castellan@plant.test>'
	});
	// The relay is down: nothing listens where the mailer connects.
	deadMailer = createMailer({
		smtpUrl: `smtp://127.0.0.1:${await closedPort()}`,
		from: 'Castellan <castellan@plant.test>'
	});
});
afterAll(async () => {
	mailer.close();
	deadMailer.close();
	await mail.close();
});
beforeEach(() => mail.clear());

describe('SMTP failures', () => {
	let db: DB;
	beforeEach(async () => {
		db = await openTestDatabase();
		await seedPlant(db);
	});
	afterEach(async () => {
		await db.destroy();
	});

	it('leaves rows pending with the error while the relay is down, then sends them once it is back', async () => {
		const down = await runNotices(db, { now: NOW, mailer: deadMailer, origin: ORIGIN });
		expect(down).toMatchObject({
			written: 4,
			queued: 8,
			digests: 0,
			sent: 0,
			retrying: 8,
			failed: 0
		});
		expect(down.errors).toHaveLength(2);
		const rows = await db.selectFrom('notice_deliveries').selectAll().execute();
		for (const row of rows) {
			expect(row).toMatchObject({ state: 'pending', attempts: 1, digest_id: null, sent_at: null });
			expect(row.last_error).toMatch(/could not be sent/);
			expect(row.next_attempt_at).toBe(at(NOW, BACKOFF_BASE_MS));
		}
		expect((await outboxHealth(db, NOW)).status).toBe('retrying');

		// The relay is back, but the back-off has not run out: nothing goes yet.
		const early = await runNotices(db, {
			now: at(NOW, BACKOFF_BASE_MS / 2),
			mailer,
			origin: ORIGIN
		});
		expect(early).toMatchObject({ written: 0, digests: 0 });
		expect(mail.messages()).toEqual([]);

		const back = await runNotices(db, {
			now: at(NOW, BACKOFF_BASE_MS + 1),
			mailer,
			origin: ORIGIN
		});
		expect(back).toMatchObject({ written: 0, digests: 2, sent: 8 });
		for (const email of TOOLROOM_RECIPIENTS) {
			const digests = mailFor(mail.messages(), email);
			expect(digests).toHaveLength(1);
			expect(diesIn(digests[0])).toEqual(['D-9003', 'D-9002', 'D-9001', 'D-9005']);
		}
		expect(await deliveryStates(db)).toEqual({ sent: 8 });
		const health = await outboxHealth(db, at(NOW, BACKOFF_BASE_MS + 1));
		expect(health).toMatchObject({ pending: 0, failed: 0, sentLastDay: 8, status: 'ok' });

		// And never again. Later the same plant day: service days are whole calendar days, so on
		// the next day D-9002 (done 29 January 18:00, 30-day interval) reaches 33 days = 110 % —
		// overdue, a worse state that is rightly told again.
		mail.clear();
		await runNotices(db, { now: at(NOW, 12 * 3_600_000), mailer, origin: ORIGIN });
		expect(mail.messages()).toEqual([]);
	});

	it('marks rows failed after the attempt limit, and an admin resend sends them', async () => {
		let clock = NOW;
		for (let attempt = 1; attempt <= 3; attempt++) {
			const r = await runNotices(db, {
				now: clock,
				mailer: deadMailer,
				origin: ORIGIN,
				maxAttempts: 3
			});
			expect(r.failed).toBe(attempt === 3 ? 8 : 0);
			// Past each back-off, not so far that any die moves to a new state.
			clock = at(clock, 3 * 3_600_000);
		}
		expect(await deliveryStates(db)).toEqual({ failed: 8 });
		const health = await outboxHealth(db, clock);
		expect(health).toMatchObject({ failed: 8, status: 'failing' });
		expect(health.lastError).toMatch(/could not be sent/);

		// Failed rows stay put, however long the relay has been back.
		expect(await runNotices(db, { now: clock, mailer, origin: ORIGIN })).toMatchObject({
			digests: 0
		});

		const lead = await db
			.selectFrom('notice_deliveries')
			.select('id')
			.where('recipient', '=', 'lead@plant.test')
			.execute();
		for (const { id } of lead) expect(await resendDelivery(db, id, clock)).toBe(true);
		// A row that is not failed is not touched.
		expect(await resendDelivery(db, lead[0].id, clock)).toBe(false);

		const r = await sendPending(db, mailer, clock, { origin: ORIGIN });
		expect(r).toMatchObject({ digests: 1, sent: 4 });
		expect(mail.messages().map((m) => m.to)).toEqual([['lead@plant.test']]);
		expect(await deliveryStates(db)).toEqual({ sent: 4, failed: 4 });
	});
});

describe('restarts', () => {
	let dir: string;
	beforeEach(() => {
		dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-notices-'));
	});
	afterEach(() => {
		fs.rmSync(dir, { recursive: true, force: true });
	});

	async function preparedFile(): Promise<string> {
		const file = path.join(dir, 'plant.db');
		const db = openDatabase(file);
		await migrateToLatest(db);
		await seedPlant(db);
		await db.destroy();
		return file;
	}

	it('sends once when the process restarts between writing the outbox and sending', async () => {
		const file = await preparedFile();
		const before = openDatabase(file);
		const items = await findNoticeItems(before, NOW);
		await writeOutbox(before, items, await listNoticeRecipients(before), NOW);
		// The process stops here, before sending.
		await before.destroy();

		const after = openDatabase(file);
		const freshMailer = createMailer({
			smtpUrl: `smtp://127.0.0.1:${mail.smtpPort}`,
			from: 'Castellan <castellan@plant.test>'
		});
		try {
			const resumed = await runNotices(after, { now: NOW, mailer: freshMailer, origin: ORIGIN });
			expect(resumed).toMatchObject({ written: 0, digests: 2, sent: 8 });
			expect(
				await runNotices(after, { now: NOW, mailer: freshMailer, origin: ORIGIN })
			).toMatchObject({
				digests: 0
			});
		} finally {
			freshMailer.close();
			await after.destroy();
		}
		expect(
			mail
				.messages()
				.map((m) => m.to)
				.sort()
		).toEqual(TOOLROOM_RECIPIENTS.map((e) => [e]));
	});

	it('sends again after the lease when a process died while its mail was on the way', async () => {
		const file = await preparedFile();
		const dying = openDatabase(file);
		// The relay never answers this process: it claims the rows, then "dies" mid-send.
		const hung = { send: () => new Promise<never>(() => {}) };
		void runNotices(dying, { now: NOW, mailer: hung, origin: ORIGIN });
		await expect
			.poll(
				async () =>
					(
						await dying
							.selectFrom('notice_deliveries')
							.select('digest_id')
							.where('digest_id', 'is not', null)
							.execute()
					).length
			)
			.toBe(8);

		const other = openDatabase(file);
		try {
			// Within the lease another process leaves the claimed rows alone ...
			expect(await sendPending(other, mailer, at(NOW, 60_000), { origin: ORIGIN })).toMatchObject({
				digests: 0
			});
			// ... after it, they go out.
			const late = await sendPending(other, mailer, at(NOW, CLAIM_LEASE_MS + 1), {
				origin: ORIGIN
			});
			expect(late).toMatchObject({ digests: 2, sent: 8 });
		} finally {
			await other.destroy();
			await dying.destroy();
		}
		expect(mail.messages()).toHaveLength(2);
	});
});

describe('plant identity on notices', () => {
	it('the digest comes from the plant’s name at MAIL_FROM’s address and ends with its contact', async () => {
		const db = await openTestDatabase();
		await seedPlant(db);
		await db
			.updateTable('plant_settings')
			.set({
				plant_name: 'Kestrel Casting Works',
				contact_email: 'tooling@kestrel.test',
				contact_phone: '+44 1632 960000'
			})
			.execute();
		const r = await runNotices(db, { now: NOW, mailer, origin: ORIGIN });
		expect(r.digests).toBeGreaterThan(0);
		for (const m of mail.messages()) {
			expect(m.from).toBe('"Kestrel Casting Works" <castellan@plant.test>');
			expect(m.text).toContain('Kestrel Casting Works · tooling@kestrel.test · +44 1632 960000');
		}
	});
});
