import { beforeEach, describe, expect, test } from 'vitest';
import type { FakeMail } from '../../fakes/mail/server';
import { describeHistoryEntry } from '../../src/lib/history';
import { getDieStory, findDie } from '../../src/lib/server/dies/die-detail';
import type { Mailer } from '../../src/lib/server/mail/transport';
import { sendPending } from '../../src/lib/server/notices/send';
import {
	answerOwnerDecision,
	listOpenDecisionsForOwner,
	loadDecisionCard
} from '../../src/lib/server/owner/decisions';
import { holdForOwnerDecision } from '../../src/lib/server/owner/hold';
import { LEAD, type ShotPlant } from './shots-fixture';
import { ACME_CONTACT, ACME_USER, makeOwnerPlant, ORIGIN, useFakeMail } from './owner-mail-support';

// The owner-decision round trip through the outbox and the fake mail server: the toolroom lead
// holds A-0001 (ACME's) waiting for the owner's decision with a quote; ACME's portal user and
// contact address get a mail; the portal user answers; the lead gets a mail, the die page shows
// "Owner answered" with who and when, and the history keeps both steps. BOLT (another owner)
// cannot answer; a second answer is refused and the first stands.

const LEAD_MAIL = 'lead@plant.test';
const fake = useFakeMail();
let p: ShotPlant;
let mail: FakeMail;
let mailer: Mailer;

beforeEach(async () => {
	mail = fake.mail();
	mailer = fake.mailer();
	mail.clear();
	p = await makeOwnerPlant();
});

const deliver = (at: string) => sendPending(p.db, mailer, at, { origin: ORIGIN });
// The hold is stamped with the clock (as the die page does), so the rest of the story follows it.
const START = Date.now();
const later = (minutes: number) => new Date(START + minutes * 60_000).toISOString();

async function hold() {
	const die = (await findDie(p.db, 'A-0001', { customerId: null }))!;
	const r = await holdForOwnerDecision(
		p.db,
		die,
		{
			question: 'Weld the gate-side crack, or order a new die?',
			quotedHours: 12.5,
			quotedCost: 1850
		},
		'Crack at the gate, grade 3',
		LEAD,
		null
	);
	expect(r.ok).toBe(true);
	return die;
}

describe('owner decisions', () => {
	test('round trip: lead holds → owner mail → owner answers → lead mail, die page card, history', async () => {
		const die = await hold();
		expect(
			(
				await p.db
					.selectFrom('dies')
					.select('status')
					.where('id', '=', die.id)
					.executeTakeFirstOrThrow()
			).status
		).toBe('held');

		await deliver(later(1));
		const toOwner = mail.messages().filter((m) => m.to.includes(ACME_USER));
		expect(toOwner).toHaveLength(1);
		expect(toOwner[0].subject).toBe('Castellan: A-0001 is held until you decide');
		expect(toOwner[0].text).toContain('Weld the gate-side crack, or order a new die?');
		// 12.5 h and 1 850 with two decimals, as typed.
		expect(toOwner[0].text).toContain('Quoted repair: 12.5 h, cost 1,850.00');
		expect(toOwner[0].text).toContain(`${ORIGIN}/owner/dies/A-0001#decision`);
		expect(mail.messages().filter((m) => m.to.includes(ACME_CONTACT))).toHaveLength(1);
		expect(mail.messages().filter((m) => m.to.includes('buyer@bolt.test'))).toHaveLength(0);
		// Once per hold: sending again sends nothing.
		mail.clear();
		await deliver(later(2));
		expect(mail.messages()).toHaveLength(0);

		// The portal shows the card on the owner's home and die page.
		const open = await listOpenDecisionsForOwner(p.db, p.owners.acme);
		expect(open.map((d) => d.dieNumber)).toEqual(['A-0001']);
		expect(await listOpenDecisionsForOwner(p.db, p.owners.bolt)).toEqual([]);
		const card = await loadDecisionCard(p.db, die.id);
		expect(card.open).toMatchObject({ quotedHours: 12.5, quotedCost: 1850, askedBy: 'Lead' });

		const answered = await answerOwnerDecision(
			p.db,
			{
				customerId: p.owners.acme,
				dieNumber: 'A-0001',
				decisionId: card.open!.id,
				answer: 'approve_repair',
				text: 'Go ahead with the weld.',
				userId: 'u-acme'
			},
			later(10)
		);
		expect(answered).toEqual({ ok: true, queued: 1 });

		await deliver(later(11));
		const toLead = mail.messages().filter((m) => m.to.includes(LEAD_MAIL));
		expect(toLead).toHaveLength(1);
		expect(toLead[0].subject).toContain('A-0001 · the owner answered: Approve the repair');
		expect(toLead[0].text).toContain('Ada Acme (ACME Ltd) answered');
		expect(toLead[0].text).toContain('Go ahead with the weld.');
		expect(toLead[0].text).toContain(`${ORIGIN}/dies/A-0001#owner-decision`);

		const after = await loadDecisionCard(p.db, die.id);
		expect(after.open).toBeNull();
		expect(after.answered).toMatchObject({
			answer: 'approve_repair',
			answerText: 'Go ahead with the weld.',
			answeredBy: 'Ada Acme',
			answeredAt: later(10)
		});
		// The answer changes no state by itself.
		expect(
			(
				await p.db
					.selectFrom('dies')
					.select('status')
					.where('id', '=', die.id)
					.executeTakeFirstOrThrow()
			).status
		).toBe('held');

		const story = await getDieStory(
			p.db,
			(await findDie(p.db, 'A-0001', { customerId: null }))!,
			later(12)
		);
		const words = story.history.map((h) => describeHistoryEntry(h));
		expect(words).toContain(
			"Owner's decision asked: Weld the gate-side crack, or order a new die? (quoted repair: 12.5 h, cost 1,850.00)"
		);
		expect(words).toContain(
			'Owner answered: Approve the repair — Go ahead with the weld. (asked: Weld the gate-side crack, or order a new die?)'
		);
		const audit = await p.db
			.selectFrom('audit_log')
			.select(['action', 'user_id'])
			.where('action', 'like', 'owner.%')
			.orderBy('id')
			.execute();
		expect(audit).toEqual([
			{ action: 'owner.decision_asked', user_id: LEAD },
			{ action: 'owner.decision_answered', user_id: 'u-acme' }
		]);
	});

	test('another customer cannot answer (404), a second answer is refused (409) and the first stands', async () => {
		const die = await hold();
		const { open } = await loadDecisionCard(p.db, die.id);
		const base = { dieNumber: 'A-0001', decisionId: open!.id, text: '' };
		const bolt = await answerOwnerDecision(p.db, {
			...base,
			customerId: p.owners.bolt,
			answer: 'retire',
			userId: 'u-bolt'
		});
		expect(bolt).toMatchObject({ ok: false, status: 404 });
		expect((await loadDecisionCard(p.db, die.id)).open).not.toBeNull();

		const first = await answerOwnerDecision(p.db, {
			...base,
			customerId: p.owners.acme,
			answer: 'order_replacement',
			userId: 'u-acme'
		});
		expect(first.ok).toBe(true);
		const second = await answerOwnerDecision(p.db, {
			...base,
			customerId: p.owners.acme,
			answer: 'retire',
			userId: 'u-acme'
		});
		expect(second).toMatchObject({ ok: false, status: 409 });
		expect((await loadDecisionCard(p.db, die.id)).answered?.answer).toBe('order_replacement');

		// A written reply needs words.
		const die2 = (await findDie(p.db, 'Z-0001', { customerId: null }))!;
		await holdForOwnerDecision(
			p.db,
			die2,
			{ question: 'Polish or replace?', quotedHours: null, quotedCost: null },
			'Soldering',
			LEAD,
			null
		);
		const open2 = (await loadDecisionCard(p.db, die2.id)).open!;
		expect(
			await answerOwnerDecision(p.db, {
				customerId: p.owners.acme,
				dieNumber: 'Z-0001',
				decisionId: open2.id,
				answer: 'write_back',
				text: '  ',
				userId: 'u-acme'
			})
		).toMatchObject({ ok: false, status: 400 });
		// A question from another die, sent on this die's page: 404.
		expect(
			await answerOwnerDecision(p.db, {
				customerId: p.owners.acme,
				dieNumber: 'A-0001',
				decisionId: open2.id,
				answer: 'retire',
				text: '',
				userId: 'u-acme'
			})
		).toMatchObject({ ok: false, status: 404 });
	});

	test('a die with an open question cannot be asked again; nothing moves', async () => {
		const die = await hold();
		await p.db
			.updateTable('dies')
			.set({ status: 'in_toolroom' })
			.where('id', '=', die.id)
			.execute();
		const again = await holdForOwnerDecision(
			p.db,
			{ ...die, status: 'in_toolroom' },
			{ question: 'Again?', quotedHours: null, quotedCost: null },
			'Again',
			LEAD,
			null
		);
		expect(again.ok).toBe(false);
		const row = await p.db
			.selectFrom('dies')
			.select('status')
			.where('id', '=', die.id)
			.executeTakeFirstOrThrow();
		expect(row.status).toBe('in_toolroom');
		expect(await p.db.selectFrom('owner_decisions').select('id').execute()).toHaveLength(1);
	});
});
