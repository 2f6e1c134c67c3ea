import { beforeEach, describe, expect, test } from 'vitest';
import { recordShots, type ShotInput } from '../../src/lib/server/shots/ledger';
import { ingestShotBody } from '../../src/lib/server/shots/api-ingest';
import {
	hoursFromNow,
	LEAD,
	ledgerState,
	makeShotPlant,
	NOW,
	plant,
	snapshot,
	type ShotPlant
} from './shots-fixture';

let p: ShotPlant;
beforeEach(async () => {
	p = await makeShotPlant();
});

/** Deterministic pseudo-random numbers, so a failure can be replayed. */
function prng(seed: number) {
	return () => {
		seed = (seed * 1_103_515_245 + 12_345) % 2 ** 31;
		return seed / 2 ** 31;
	};
}

describe('ledger totals equal the ledger', () => {
	test('after many concurrent clients posting overlapping keys, every total matches exactly', async () => {
		const rand = prng(42);
		const dies = ['Z-0001', 'A-0001', 'B-0001'];
		// A pool of readings, each bound to its key for good: a repeated key is a retry of the same
		// reading. Slots are an hour apart per die, so every count is plausible in any arrival order.
		const pool: ShotInput[] = Array.from({ length: 300 }, (_, i) => ({
			die: dies[i % 3],
			shots: 1 + Math.floor(rand() * 300),
			countedAt: hoursFromNow(-2000 + Math.floor(i / 3) * 2),
			key: `reading-${i}`,
			machine: i % 3 === 0 ? 'HC-08' : 'CC-84'
		}));
		const keyless: ShotInput[] = [];
		let keylessSlot = 0;
		const clients = Array.from({ length: 6 }, (_, c) => async () => {
			const answers = [];
			for (let b = 0; b < 25; b++) {
				const picked = new Set<number>();
				while (picked.size < 20) picked.add(Math.floor(rand() * pool.length));
				const batch: ShotInput[] = [...picked].map((i) => pool[i]);
				// Two keyless readings per batch: each one counts.
				for (let k = 0; k < 2; k++) {
					const row = {
						die: dies[(c + k) % 3],
						shots: 1 + Math.floor(rand() * 50),
						countedAt: hoursFromNow(-1 - (keylessSlot++ % 400) * 0.5 - 0.25)
					};
					keyless.push(row);
					batch.push(row);
				}
				answers.push(await recordShots(p.db, batch, plant, { source: 'api', now: NOW }));
			}
			return answers;
		});
		const results = (await Promise.all(clients.map((run) => run()))).flat();

		for (const r of results) expect(r.ok, JSON.stringify(!r.ok && r.issues)).toBe(true);
		const ok = results.filter((r) => r.ok);
		const sentKeys = ok.length * 20;
		const entries = await p.db.selectFrom('shot_entries').select(['idem_key']).execute();
		const countedKeys = new Set(entries.filter((e) => e.idem_key).map((e) => e.idem_key));
		// Every key is in the ledger exactly once (the unique index would refuse a second, but the
		// ledger must not even try), and accepted + duplicates add up to what was sent.
		expect(entries.filter((e) => e.idem_key).length).toBe(countedKeys.size);
		const accepted = ok.reduce((s, r) => s + r.accepted, 0);
		const duplicates = ok.reduce((s, r) => s + r.duplicates, 0);
		expect(accepted).toBe(countedKeys.size + keyless.length);
		expect(duplicates).toBe(sentKeys - countedKeys.size);
		expect(duplicates).toBeGreaterThan(0);

		for (const [name, dieId] of [
			['Z-0001', p.dies.zinc],
			['A-0001', p.dies.alu],
			['B-0001', p.dies.bolt]
		] as const) {
			const expected =
				pool
					.filter((r) => r.die === name && countedKeys.has(r.key!))
					.reduce((s, r) => s + r.shots, 0) +
				keyless.filter((r) => r.die === name).reduce((s, r) => s + r.shots, 0);
			const state = await ledgerState(p.db, dieId);
			expect(state.total).toBe(expected);
			expect(state.ledgerSum).toBe(expected);
			expect(state.dailySum).toBe(expected);
			for (const h of state.halves) expect(h.shots).toBe(expected);
			const daily = await p.db
				.selectFrom('shot_daily')
				.select(['day', 'shots'])
				.where('die_id', '=', dieId)
				.execute();
			expect(new Map(daily.map((d) => [d.day, d.shots]))).toEqual(state.ledgerDays);
		}
		// The totals the answers report are the die totals at that moment; the last one is final.
		const last = ok[ok.length - 1];
		for (const d of last.dies) {
			const row = await p.db
				.selectFrom('dies')
				.select('total_shots')
				.where('number', '=', d.die)
				.executeTakeFirstOrThrow();
			expect(d.totalShots).toBeLessThanOrEqual(row.total_shots);
		}
	});

	test('a retried key is acknowledged even after the die was retired, and counts nothing', async () => {
		const first = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 120, key: 'k-1', countedAt: hoursFromNow(-5) }],
			plant,
			{ source: 'api', now: NOW }
		);
		expect(first).toMatchObject({ ok: true, accepted: 1, duplicates: 0 });
		await p.db
			.updateTable('dies')
			.set({ status: 'retired' })
			.where('id', '=', p.dies.alu)
			.execute();
		const again = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 120, key: 'k-1', countedAt: hoursFromNow(-5) }],
			plant,
			{ source: 'api', now: NOW }
		);
		expect(again).toEqual({
			ok: true,
			accepted: 0,
			duplicates: 1,
			dies: [{ die: 'A-0001', totalShots: 120 }],
			outcome: ['duplicate'],
			warnings: [],
			entryIds: []
		});
		expect((await ledgerState(p.db, p.dies.alu)).entries).toBe(1);
	});

	test('entries come back exactly as sent, in order, whatever characters their texts hold', async () => {
		// PostgreSQL writes a batch as arrays of column values: quotes, backslashes, braces, commas
		// and the word NULL must survive as text, and a missing note as a real null.
		const notes = ['say "hi", {x}', 'back\\slash', 'NULL', null, 'plain'];
		const rows: ShotInput[] = notes.map((note, i) => ({
			die: 'Z-0001',
			shots: 10 + i,
			countedAt: hoursFromNow(-10 + i),
			key: `text-${i}`,
			note
		}));
		const r = await recordShots(p.db, rows, plant, { source: 'api', now: NOW });
		expect(r).toMatchObject({ ok: true, accepted: 5 });
		const stored = await p.db
			.selectFrom('shot_entries')
			.select(['id', 'note', 'shots', 'idem_key', 'counted_at'])
			.orderBy('id')
			.execute();
		expect(stored).toEqual(
			notes.map((note, i) => ({
				id: r.ok ? r.entryIds[i] : -1,
				note,
				shots: 10 + i,
				idem_key: `text-${i}`,
				counted_at: hoursFromNow(-10 + i)
			}))
		);
	});

	test('a dry run answers like the real write and writes nothing', async () => {
		const before = await snapshot(p.db);
		const rows = [
			{ die: 'Z-0001', shots: 500, countedAt: hoursFromNow(-3), key: 'dry-1' },
			{ die: 'Z-0001', shots: 700, countedAt: hoursFromNow(-2) }
		];
		const dry = await recordShots(p.db, rows, plant, { source: 'csv', now: NOW, dryRun: true });
		expect(await snapshot(p.db)).toEqual(before);
		const real = await recordShots(p.db, rows, plant, { source: 'csv', now: NOW });
		// The same answer, except that only the real write has entry ids to report.
		expect(real).toEqual({ ...dry, entryIds: [expect.any(Number), expect.any(Number)] });
		expect(dry).toMatchObject({ entryIds: [] });
		expect((await ledgerState(p.db, p.dies.zinc)).total).toBe(1200);
	});
});

describe('every bad input gets its own message and changes nothing', () => {
	const customer = { userId: null, tokenId: null, customerId: 0 };
	const cases: {
		name: string;
		rows: () => ShotInput[];
		source?: 'api' | 'correction' | 'manual';
		actor?: 'customerAcme';
		issue: { index: number; field: string; message: RegExp };
	}[] = [
		{
			name: 'non-integer shots',
			rows: () => [{ die: 'A-0001', shots: 12.5 }],
			issue: { index: 0, field: 'shots', message: /^Shots must be a whole number\.$/ }
		},
		{
			name: 'zero shots',
			rows: () => [{ die: 'A-0001', shots: 0 }],
			issue: { index: 0, field: 'shots', message: /^Zero shots counts nothing/ }
		},
		{
			name: 'negative shots',
			rows: () => [{ die: 'A-0001', shots: -40 }],
			issue: {
				index: 0,
				field: 'shots',
				message: /^Shots must be a positive whole number; a correction/
			}
		},
		{
			name: 'counter end below start',
			rows: () => [{ die: 'A-0001', shots: -10, counterStart: 500, counterEnd: 490 }],
			issue: {
				index: 0,
				field: 'counterEnd',
				message: /^The counter end is below the counter start\.$/
			}
		},
		{
			name: 'counter that did not move',
			rows: () => [{ die: 'A-0001', shots: 0, counterStart: 500, counterEnd: 500 }],
			issue: { index: 0, field: 'counterEnd', message: /did not move/ }
		},
		{
			name: 'shots not matching the counters',
			rows: () => [{ die: 'A-0001', shots: 30, counterStart: 500, counterEnd: 520 }],
			issue: {
				index: 0,
				field: 'shots',
				message: /must equal counter end minus counter start \(20\)/
			}
		},
		{
			name: 'only one counter reading',
			rows: () => [{ die: 'A-0001', shots: 20, counterStart: 500 }],
			issue: { index: 0, field: 'counterEnd', message: /Give both counter readings/ }
		},
		{
			name: 'more than a day in the future',
			rows: () => [{ die: 'A-0001', shots: 10, countedAt: hoursFromNow(25) }],
			issue: {
				index: 0,
				field: 'countedAt',
				message: /^Counted-at is more than a day in the future\.$/
			}
		},
		{
			name: 'not a date',
			rows: () => [{ die: 'A-0001', shots: 10, countedAt: 'yesterday' }],
			issue: { index: 0, field: 'countedAt', message: /is not a date and time/ }
		},
		{
			name: '30 February',
			rows: () => [{ die: 'A-0001', shots: 10, countedAt: '2026-02-30T10:00:00.000Z' }],
			issue: { index: 0, field: 'countedAt', message: /is not a date and time/ }
		},
		{
			name: 'hour 24',
			rows: () => [{ die: 'A-0001', shots: 10, countedAt: '2026-06-01 24:00' }],
			issue: { index: 0, field: 'countedAt', message: /is not a date and time/ }
		},
		{
			name: 'a date before 2000',
			rows: () => [{ die: 'A-0001', shots: 10, countedAt: '0026-06-01T10:00:00Z' }],
			issue: { index: 0, field: 'countedAt', message: /before the year 2000/ }
		},
		{
			name: 'a retired die',
			rows: () => [{ die: 'R-0001', shots: 10 }],
			issue: {
				index: 0,
				field: 'die',
				message: /^Die R-0001 is retired and takes no more shots\.$/
			}
		},
		{
			name: 'an unknown die',
			rows: () => [{ die: 'X-9999', shots: 10 }],
			issue: { index: 0, field: 'die', message: /^There is no die X-9999\.$/ }
		},
		{
			name: 'an unknown press',
			rows: () => [{ die: 'A-0001', shots: 10, machine: 'CC-999' }],
			issue: { index: 0, field: 'machine', message: /^There is no press called CC-999\.$/ }
		},
		{
			name: 'more shots than the press could make since the previous reading',
			rows: () => [
				{ die: 'A-0001', shots: 100, countedAt: hoursFromNow(-2) },
				// Aluminium, cold chamber: at most 400 shots/h (twice the NADCA top of range), so 1 h
				// after the previous reading 5000 shots is a typing error.
				{ die: 'A-0001', shots: 5000, countedAt: hoursFromNow(-1) }
			],
			// Implausible, not impossible: on the form and CSV a person must confirm it with a reason
			// (the API accepts it "to review", tested in shots-review.test.ts).
			issue: {
				index: 1,
				field: 'confirm',
				message:
					/5,000 shots between the previous count .* is more than a press can plausibly make: at most 400 at 400 shots\/h\. To count it anyway, confirm with a reason\./
			}
		},
		{
			name: 'a customer-bound caller on another owner’s die',
			actor: 'customerAcme',
			rows: () => [{ die: 'B-0001', shots: 10 }],
			issue: { index: 0, field: 'die', message: /^There is no die B-0001\.$/ }
		},
		{
			name: 'a batch over 5000',
			rows: () => Array.from({ length: 5001 }, () => ({ die: 'A-0001', shots: 1 })),
			issue: {
				index: 5000,
				field: 'batch',
				message: /at most 5000 entries at once \(this batch has 5001\)/
			}
		},
		{
			name: 'a key twice in one batch',
			rows: () => [
				{ die: 'A-0001', shots: 10, key: 'same', countedAt: hoursFromNow(-3) },
				{ die: 'A-0001', shots: 10, key: 'same', countedAt: hoursFromNow(-2) }
			],
			issue: { index: 1, field: 'key', message: /The key "same" appears twice in this batch/ }
		},
		{
			name: 'an empty batch',
			rows: () => [],
			issue: { index: 0, field: 'batch', message: /^Nothing to count\.$/ }
		},
		{
			name: 'an entry above ten million',
			rows: () => [{ die: 'A-0001', shots: 20_000_000 }],
			issue: { index: 0, field: 'shots', message: /not plausible \(at most 10000000\)/ }
		},
		{
			name: 'a correction without reason',
			source: 'correction',
			rows: () => [{ die: 'A-0001', shots: -5 }],
			issue: { index: 0, field: 'note', message: /^A correction needs a reason\.$/ }
		},
		{
			name: 'a correction below zero',
			source: 'correction',
			rows: () => [{ die: 'A-0001', shots: -5, note: 'counter reset' }],
			issue: { index: 0, field: 'shots', message: /below zero shots \(it has 0\)/ }
		}
	];

	for (const c of cases) {
		test(c.name, async () => {
			const before = await snapshot(p.db);
			const actor = c.actor ? { ...customer, customerId: p.owners.acme } : plant;
			const result = await recordShots(p.db, c.rows(), actor, {
				source: c.source ?? 'api',
				now: NOW
			});
			expect(result.ok).toBe(false);
			if (result.ok) return;
			expect(result.issues).toHaveLength(1);
			expect(result.issues[0]).toMatchObject({ index: c.issue.index, field: c.issue.field });
			expect(result.issues[0].message).toMatch(c.issue.message);
			expect(await snapshot(p.db)).toEqual(before);
		});
	}

	test('a key already used for another die is refused, not silently swallowed', async () => {
		await recordShots(
			p.db,
			[{ die: 'Z-0001', shots: 10, key: 'gw-1', countedAt: hoursFromNow(-3) }],
			plant,
			{ source: 'api', now: NOW }
		);
		const before = await snapshot(p.db);
		const r = await recordShots(p.db, [{ die: 'A-0001', shots: 10, key: 'gw-1' }], plant, {
			source: 'api',
			now: NOW
		});
		expect(r).toEqual({
			ok: false,
			issues: [
				{
					index: 0,
					field: 'key',
					// hoursFromNow(-3) = 2026-06-10 09:00 UTC (the test plant runs on UTC).
					message: `The key "gw-1" was already used for a different count (10 shots counted 2026-06-10 09:00 UTC); send a new key for a new count.`,
					original: {
						die: null,
						shots: 10,
						countedAt: '2026-06-10T09:00:00.000Z',
						counterStart: null,
						counterEnd: null
					}
				}
			]
		});
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('one bad row in a batch stops the whole batch, and every bad row is named', async () => {
		const before = await snapshot(p.db);
		const r = await recordShots(
			p.db,
			[
				{ die: 'Z-0001', shots: 10, countedAt: hoursFromNow(-4) },
				{ die: 'R-0001', shots: 10 },
				{ die: 'A-0001', shots: 10, countedAt: hoursFromNow(-3) },
				{ die: 'A-0001', shots: 1.5 }
			],
			plant,
			{ source: 'api', now: NOW }
		);
		expect(r.ok).toBe(false);
		if (!r.ok)
			expect(r.issues.map((i) => [i.index, i.field])).toEqual([
				[1, 'die'],
				[3, 'shots']
			]);
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('a back-dated reading is checked against the reading before it', async () => {
		await recordShots(
			p.db,
			[
				{ die: 'A-0001', shots: 100, countedAt: hoursFromNow(-10) },
				{ die: 'A-0001', shots: 100, countedAt: hoursFromNow(-1) }
			],
			plant,
			{ source: 'api', now: NOW }
		);
		// 30 min after the reading at −10 h: at most 200 shots at 400/h.
		const late = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 900, countedAt: hoursFromNow(-9.5) }],
			plant,
			{ source: 'api', now: NOW }
		);
		expect(late.ok).toBe(false);
		const fine = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 150, countedAt: hoursFromNow(-9.5) }],
			plant,
			{ source: 'api', now: NOW }
		);
		expect(fine.ok).toBe(true);
	});
});

describe('corrections', () => {
	test('a negative correction moves die and halves, is audited and leaves the rate check alone', async () => {
		await recordShots(p.db, [{ die: 'A-0001', shots: 300, countedAt: hoursFromNow(-2) }], plant, {
			source: 'manual',
			now: NOW
		});
		const r = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: -120, note: 'Counter double-counted the dry cycles' }],
			plant,
			{ source: 'correction', now: NOW }
		);
		expect(r).toMatchObject({ ok: true, accepted: 1, dies: [{ die: 'A-0001', totalShots: 180 }] });
		const state = await ledgerState(p.db, p.dies.alu);
		expect(state).toMatchObject({ total: 180, ledgerSum: 180, dailySum: 180 });
		for (const h of state.halves) expect(h.shots).toBe(180);
		const audit = await p.db
			.selectFrom('audit_log')
			.selectAll()
			.where('action', '=', 'shots.correction')
			.execute();
		expect(audit).toHaveLength(1);
		expect(audit[0]).toMatchObject({ user_id: LEAD, die_id: p.dies.alu });
		expect(JSON.parse(audit[0].detail)).toMatchObject({
			shots: -120,
			reason: 'Counter double-counted the dry cycles'
		});
		const die = await p.db
			.selectFrom('dies')
			.select('last_counted_at')
			.where('id', '=', p.dies.alu)
			.executeTakeFirstOrThrow();
		expect(die.last_counted_at).toBe(hoursFromNow(-2));
	});
});

describe('POST /api/v1/shots body handling', () => {
	test('a single object answers 201 with the die total; the same key again counts nothing', async () => {
		const body = {
			die: 'z-0001',
			shots: 250,
			key: 'press-7:1001',
			machine: 'hc-08',
			countedAt: hoursFromNow(-1)
		};
		expect(await ingestShotBody(p.db, body, plant, NOW)).toEqual({
			status: 201,
			body: {
				accepted: 1,
				duplicates: 0,
				dies: [{ die: 'Z-0001', totalShots: 250 }],
				warnings: []
			}
		});
		expect(await ingestShotBody(p.db, body, plant, NOW)).toEqual({
			status: 201,
			body: {
				accepted: 0,
				duplicates: 1,
				dies: [{ die: 'Z-0001', totalShots: 250 }],
				warnings: []
			}
		});
	});

	test('an unknown die is 404 for a single object and a row issue in a batch', async () => {
		expect(await ingestShotBody(p.db, { die: 'X-1', shots: 5 }, plant, NOW)).toEqual({
			status: 404,
			body: { error: 'There is no die X-1.' }
		});
		const batch = await ingestShotBody(
			p.db,
			[
				{ die: 'Z-0001', shots: 5 },
				{ die: 'X-1', shots: 5 }
			],
			plant,
			NOW
		);
		expect(batch).toEqual({
			status: 400,
			body: {
				error: '1 of 2 entries have problems; nothing was counted.',
				issues: [{ index: 1, field: 'die', message: 'There is no die X-1.' }]
			}
		});
	});

	test('shape and meaning problems come back together, row by row, and nothing is written', async () => {
		const before = await snapshot(p.db);
		const answer = await ingestShotBody(
			p.db,
			[
				{ die: 'Z-0001', shots: '12' },
				{ die: 'R-0001', shots: 5 },
				{ die: 'Z-0001', shots: 5, counted_at: '2026-06-10' },
				'not an object',
				{ die: 'Z-0001', shots: 5, countedAt: hoursFromNow(2) }
			],
			plant,
			NOW
		);
		expect(answer.status).toBe(400);
		expect(answer.body).toEqual({
			error: '4 of 5 entries have problems; nothing was counted.',
			issues: [
				{ index: 0, field: 'shots', message: 'shots must be a number.' },
				{ index: 1, field: 'die', message: 'Die R-0001 is retired and takes no more shots.' },
				{
					index: 2,
					field: 'counted_at',
					message:
						'Unknown field "counted_at"; use die, shots, counterStart, counterEnd, countedAt, press, key, resetReason.'
				},
				{ index: 3, field: 'entry', message: 'Each entry must be an object.' }
			]
		});
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('bodies that are not entries get a plain 400', async () => {
		expect(await ingestShotBody(p.db, 42, plant, NOW)).toMatchObject({
			status: 400,
			body: { error: 'Send one entry object or an array of entries.' }
		});
		expect(await ingestShotBody(p.db, [], plant, NOW)).toMatchObject({
			status: 400,
			body: { error: 'The array is empty: nothing to count.' }
		});
		const big = Array.from({ length: 5001 }, () => ({ die: 'Z-0001', shots: 1 }));
		expect(await ingestShotBody(p.db, big, plant, NOW)).toMatchObject({
			status: 400,
			body: { error: expect.stringMatching(/at most 5000 entries at once \(this batch has 5001\)/) }
		});
	});

	test('a customer-bound token counts on its own dies and is told another owner’s die does not exist', async () => {
		const acme = { userId: null, tokenId: null, customerId: p.owners.acme };
		expect((await ingestShotBody(p.db, { die: 'A-0001', shots: 5 }, acme, NOW)).status).toBe(201);
		expect(await ingestShotBody(p.db, { die: 'B-0001', shots: 5 }, acme, NOW)).toEqual({
			status: 404,
			body: { error: 'There is no die B-0001.' }
		});
		expect((await ledgerState(p.db, p.dies.bolt)).total).toBe(0);
	});
});
