import { beforeEach, describe, expect, test } from 'vitest';
import type { FakeMail } from '../../fakes/mail/server';
import { replaceHalf } from '../../src/lib/server/dies/halves';
import type { Mailer } from '../../src/lib/server/mail/transport';
import { runNotices } from '../../src/lib/server/notices/run';
import { recordShots } from '../../src/lib/server/shots/ledger';
import { hoursFromNow, LEAD, NOW, plant, type ShotPlant } from './shots-fixture';
import { ACME_CONTACT, ACME_USER, makeOwnerPlant, ORIGIN, useFakeMail } from './owner-mail-support';

// Near-end-of-life notices to a die's owner, run by the notice job. A-0001 (ACME, aluminium
// A380, 125 000 shots expected — the alloy's figure, on both halves) takes 14 × 7 500 =
// 105 000 shots in the 14 days before NOW (2026-06-10 12:00 UTC). By hand:
//   life used        105 000 / 125 000 = 84 %             → past 80 %, not 95 %
//   shots remaining  125 000 − 105 000 = 20 000
//   rate             105 000 / 28 days = 3 750 shots a day
//   end of life      20 000 / 3 750 = 5.33 days, rounded up to 6 → 2026-06-16
//   reorder by       2026-06-16 − 84 days (aluminium default lead time): back 16 days is
//                    2026-05-31, 30 more 2026-05-01, 30 more 2026-04-01, 8 more 2026-03-24
//                    → before today, so the reorder-by date has come.
// B-0001 belongs to BOLT and has run nothing: BOLT hears nothing.

const fake = useFakeMail();
let p: ShotPlant;
let mail: FakeMail;
let mailer: Mailer;

beforeEach(async () => {
	mail = fake.mail();
	mailer = fake.mailer();
	mail.clear();
	p = await makeOwnerPlant();
	for (let day = 1; day <= 14; day++) {
		const r = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 7500, countedAt: hoursFromNow(-24 * day) }],
			plant,
			{ source: 'manual', now: NOW }
		);
		expect(r.ok).toBe(true);
	}
});

const run = (now: string) => runNotices(p.db, { now, mailer, origin: ORIGIN });
const ownerMail = () => mail.messages().filter((m) => m.to.includes(ACME_USER));

async function addShots(shots: number, at: string) {
	const r = await recordShots(p.db, [{ die: 'A-0001', shots, countedAt: at }], plant, {
		source: 'manual',
		now: at
	});
	expect(r.ok, JSON.stringify(r)).toBe(true);
}

describe('near-end-of-life notices to the owner', () => {
	test('80 % and reorder-by go once; 95 % once when passed; never again on later runs', async () => {
		await run(NOW);
		const first = ownerMail();
		expect(first).toHaveLength(1);
		const m = first[0];
		expect(m.text).toContain('A-0001');
		expect(m.text).toContain('Past 80 % of expected life');
		expect(m.text).toContain('life used 84.0 %');
		expect(m.text).toContain('20,000 shots remaining');
		expect(m.text).toContain('projected end of life 2026-06-16');
		expect(m.text).toContain('reorder by 2026-03-24');
		expect(m.text).toContain('Time to order the replacement');
		expect(m.text).toContain(`${ORIGIN}/owner/dies/A-0001`);
		expect(m.text).not.toContain('95 %');
		// The contact address hears the same, in its own mail; the other owner hears nothing.
		expect(mail.messages().filter((x) => x.to.includes(ACME_CONTACT))).toHaveLength(1);
		expect(mail.messages().filter((x) => x.to.includes('buyer@bolt.test'))).toHaveLength(0);
		// An owner mail never carries staff links.
		expect(m.text).not.toMatch(/\/dies\/A-0001\/(plan|jobs)/);

		// Second run, a day later: nothing new.
		mail.clear();
		const second = await run(hoursFromNow(24));
		expect(second.written).toBe(0);
		expect(ownerMail()).toHaveLength(0);

		// 15 000 more shots: 120 000 / 125 000 = 96 % → past 95 %, told once.
		await addShots(15_000, hoursFromNow(25));
		await run(hoursFromNow(26));
		const third = ownerMail();
		expect(third).toHaveLength(1);
		expect(third[0].text).toContain('Past 95 % of expected life');
		expect(third[0].text).toContain('life used 96.0 %');
		// 125 000 − 120 000 = 5 000 shots remaining.
		expect(third[0].text).toContain('5,000 shots remaining');
		expect(third[0].text).not.toContain('Past 80 %');
		expect(third[0].text).not.toContain('Time to order');

		mail.clear();
		await run(hoursFromNow(48));
		expect(ownerMail()).toHaveLength(0);
		const rows = await p.db
			.selectFrom('notices')
			.select(['level'])
			.where('kind', '=', 'owner_life')
			.orderBy('id')
			.execute();
		expect(rows.map((r) => r.level)).toEqual(['life_80', 'reorder_due', 'life_95']);
	});

	test('two processes running at once write each item once', async () => {
		await Promise.all([run(NOW), run(NOW)]);
		const keys = await p.db
			.selectFrom('notices')
			.select('notice_key')
			.where('kind', '=', 'owner_life')
			.execute();
		expect(keys).toHaveLength(2);
		expect(ownerMail()).toHaveLength(1);
	});

	test('a new half restarts the count: the die is news again when it passes 80 % on new steel', async () => {
		await run(NOW);
		// Both halves replaced: the new steel starts at 0 shots.
		for (const side of ['cover', 'ejector'] as const) {
			const r = await replaceHalf(
				p.db,
				p.dies.alu,
				{ side, serial: `A-0001-${side}-2`, reason: 'worn out', steel: 'H13', hardnessHrc: 46 },
				LEAD,
				hoursFromNow(1)
			);
			expect(r.ok).toBe(true);
		}
		mail.clear();
		await run(hoursFromNow(2));
		// New steel at 0 %: no life point. The reorder-by date still stands: 125 000 shots at
		// 3 750 a day is 33.3 → 34 days → end of life 2026-07-14, less 84 days is 2026-04-21,
		// before today — so the owner hears it again, once, for the new halves.
		const renewed = ownerMail();
		expect(renewed).toHaveLength(1);
		expect(renewed[0].text).toContain('Time to order the replacement');
		expect(renewed[0].text).toContain('reorder by 2026-04-21');
		expect(renewed[0].text).not.toContain('Past 80 %');
		mail.clear();
		// 100 000 shots on the new halves (10 counts of 10 000, 26 h apart so each is plausible)
		// = 80 % of 125 000 → told again.
		for (let i = 1; i <= 10; i++) await addShots(10_000, hoursFromNow(26 * i));
		await run(hoursFromNow(26 * 10 + 1));
		const again = ownerMail();
		expect(again).toHaveLength(1);
		expect(again[0].text).toContain('Past 80 % of expected life');
		expect(again[0].text).toContain('life used 80.0 %');
	});
});
