import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { startFakeMail, type FakeMail } from '../../fakes/mail/server';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { createMailer, type Mailer } from '../../src/lib/server/mail/transport';
import { queueJobCompletedMail, sendPending } from '../../src/lib/server/notices';
import { findNoticeItems } from '../../src/lib/server/notices/find';
import { runNotices } from '../../src/lib/server/notices/run';
import { recordShots } from '../../src/lib/server/shots/ledger';
import {
	at,
	days,
	diesIn,
	hours,
	mailFor,
	NOW,
	ORIGIN,
	PLANNER,
	seedPlant,
	TOOLROOM_RECIPIENTS,
	type Plant
} from './notices-support';

let mail: FakeMail;
let mailer: Mailer;
let db: DB;
let plant: Plant;

beforeAll(async () => {
	mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
	mailer = createMailer({
		smtpUrl: `smtp://127.0.0.1:${mail.smtpPort}`,
		from: 'Castellan <castellan@plant.test>'
	});
});
afterAll(async () => {
	mailer.close();
	await mail.close();
});
beforeEach(async () => {
	mail.clear();
	db = await openTestDatabase();
	plant = await seedPlant(db);
});
afterEach(async () => {
	await db.destroy();
});

const run = (now: string) => runNotices(db, { now, mailer, origin: ORIGIN });

describe('findNoticeItems', () => {
	it('reports each active task past the threshold and each die past 90 % life, nothing else', async () => {
		const items = await findNoticeItems(db, NOW, 0.9);
		const byDie = Object.fromEntries(items.map((i) => [i.payload.dieNumber, i.level]));
		expect(byDie).toEqual({
			'D-9001': 'coming_up',
			'D-9002': 'due',
			'D-9003': 'overdue',
			'D-9005': 'life_90'
		});
		expect(items.find((i) => i.payload.dieNumber === 'D-9003')?.key).toBe(
			`svc:${plant.taskIds['D-9003:sr']}:${at(NOW, -days(5))}:overdue`
		);
	});

	it('follows the coming-up threshold it is given', async () => {
		// D-9001 stands at 93 % of its interval: news at a 0.9 threshold, not at 0.95.
		const items = await findNoticeItems(db, NOW, 0.95);
		expect(items.map((i) => i.payload.dieNumber)).not.toContain('D-9001');
	});
});

describe('runNotices', () => {
	it('sends one digest per toolroom recipient with the right dies, worst first', async () => {
		const result = await run(NOW);
		expect(result).toMatchObject({ items: 4, written: 4, queued: 8, digests: 2, sent: 8 });

		const messages = mail.messages();
		expect(messages).toHaveLength(2);
		for (const email of TOOLROOM_RECIPIENTS) {
			const [digest] = mailFor(messages, email);
			expect(digest.to).toEqual([email]);
			// Overdue, due, coming up, then life.
			expect(diesIn(digest)).toEqual(['D-9003', 'D-9002', 'D-9001', 'D-9005']);
			expect(digest.subject).toBe(
				'Castellan service notice: 1 overdue, 1 due, 1 coming up, 1 past 90 % life'
			);
			expect(digest.text).toContain(`${ORIGIN}/dies/D-9003`);
			expect(digest.html).toContain(`href="${ORIGIN}/dies/D-9002"`);
			// Part names are data, not markup.
			expect(digest.html).toContain('Valve &lt;body&gt; &amp; &quot;cap&quot;');
			expect(digest.html).not.toContain('<body> &');
			expect(digest.text).toContain('lock out the press');
		}
		// Notices off, disabled account, planner and admin get no service digest.
		for (const email of ['quiet@plant.test', 'gone@plant.test', PLANNER, 'admin@plant.test']) {
			expect(mailFor(messages, email)).toEqual([]);
		}
	});

	it('sends nothing on an immediate second run, nor later the same day', async () => {
		await run(NOW);
		mail.clear();
		const again = await run(NOW);
		expect(again).toMatchObject({ items: 4, written: 0, queued: 0, digests: 0 });
		await run(at(NOW, hours(3)));
		expect(mail.messages()).toEqual([]);
	});

	it('sends a die that a shot entry pushes into due on the next run, and only that die', async () => {
		await run(NOW);
		mail.clear();
		const counted = await recordShots(
			db,
			[{ die: 'D-9004', shots: 14_000, countedAt: at(NOW, hours(1)) }],
			{ userId: 'u-lead', tokenId: null, customerId: null },
			{ source: 'manual', now: at(NOW, hours(1)) }
		);
		expect(counted.ok).toBe(true);

		const next = await run(at(NOW, hours(2)));
		expect(next).toMatchObject({ written: 1, digests: 2 });
		for (const email of TOOLROOM_RECIPIENTS) {
			const [digest] = mailFor(mail.messages(), email);
			expect(diesIn(digest)).toEqual(['D-9004']);
			expect(digest.subject).toBe('Castellan: D-9004 · Stress relief · Due');
		}
	});

	it('tells again when a task moves on to a worse state, and in the next service cycle', async () => {
		await run(NOW);
		mail.clear();
		// Two days on, the surface inspection of D-9002 is 33.5 days into 30: overdue.
		await run(at(NOW, days(2)));
		let digest = mailFor(mail.messages(), 'lead@plant.test');
		expect(digest.map(diesIn)).toEqual([['D-9002']]);
		// The state is said on the item's line inside the die's block.
		expect(digest[0].text).toContain('  * Service overdue: Surface inspection');

		// The inspection is done; thirty days later it comes round again and is news again.
		await db
			.updateTable('service_tasks')
			.set({ last_done_at: at(NOW, days(3)) })
			.where('id', '=', plant.taskIds['D-9002:si'])
			.execute();
		mail.clear();
		await run(at(NOW, days(4)));
		expect(mailFor(mail.messages(), 'lead@plant.test')).toEqual([]);
		await run(at(NOW, days(3 + 28)));
		digest = mailFor(mail.messages(), 'lead@plant.test');
		expect(digest.map(diesIn)).toEqual([['D-9002']]);
		expect(digest[0].text).toContain('  * Service coming up: Surface inspection');
	});

	it('writes nothing while nobody has notices switched on, then tells the first who does', async () => {
		await db.updateTable('users').set({ notices_enabled: 0 }).execute();
		expect(await run(NOW)).toMatchObject({ items: 4, written: 0, digests: 0 });
		await db.updateTable('users').set({ notices_enabled: 1 }).where('id', '=', 'u-quiet').execute();
		await run(at(NOW, hours(1)));
		expect(mail.messages().map((m) => m.to)).toEqual([['quiet@plant.test']]);
	});
});

describe('queueJobCompletedMail', () => {
	it('tells the planners once that a die is ready again', async () => {
		const closedAt = at(NOW, hours(1));
		const job = {
			dieNumber: 'D-9003',
			jobNumber: 'TJ-00042',
			summary: 'Stress relieved & polished.'
		};
		expect(await queueJobCompletedMail(db, job, closedAt)).toEqual({ queued: 1 });
		expect(await queueJobCompletedMail(db, job, closedAt)).toEqual({ queued: 0 });

		const sent = await sendPending(db, mailer, at(NOW, hours(1)), { origin: ORIGIN });
		expect(sent).toMatchObject({ digests: 1, sent: 1 });
		const [message] = mail.messages();
		expect(message.to).toEqual([PLANNER]);
		expect(message.subject).toBe('Castellan: D-9003 ready again · TJ-00042 closed');
		expect(message.text).toContain('TJ-00042 closed: Stress relieved & polished.');
		expect(message.html).toContain('Stress relieved &amp; polished.');
		expect(message.text).not.toContain('lock out the press');
	});

	it('refuses a die that does not exist, queueing nothing', async () => {
		await expect(
			queueJobCompletedMail(db, { dieNumber: 'D-0000', jobNumber: 'TJ-1', summary: '' }, NOW)
		).rejects.toThrow(/No die D-0000/);
		expect(await db.selectFrom('notices').selectAll().execute()).toEqual([]);
	});
});
