// The shot ledger written from two app processes at once: two Kysely instances, each with its own
// pg pool, on one PostgreSQL schema — what two `node build` processes behind one load balancer do.
// PostgreSQL only: on SQLite one process holds the file's write lock (BEGIN IMMEDIATE, with the
// busy timeout for a second process), and the one-process races in shots-ledger.test.ts and
// shots-halves.test.ts cover it; two SQLite handles in one Node process would only wait on each
// other's busy timeout on the one thread.
import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import { reopenDatabase, testEngine, type DB } from '../../src/lib/server/db/connect';
import { listHalves, replaceHalf } from '../../src/lib/server/dies/halves';
import { recordShots, type RecordResult, type ShotInput } from '../../src/lib/server/shots/ledger';
import {
	hoursFromNow,
	LEAD,
	ledgerState,
	makeShotPlant,
	NOW,
	plant,
	type ShotPlant
} from './shots-fixture';

let p: ShotPlant;
/** The second process: its own pool on the same database. */
let other: DB;

describe.skipIf(testEngine() !== 'postgres')('the shot ledger from two app processes', () => {
	beforeEach(async () => {
		p = await makeShotPlant();
		other = reopenDatabase(p.db);
	});
	afterEach(async () => {
		await other.destroy();
		await p.db.destroy();
	});

	const post = (db: DB, batch: ShotInput[]) =>
		recordShots(db, batch, plant, { source: 'api', now: NOW });

	test('the same keyed batches sent to both at once are counted exactly once', async () => {
		// 20 readings per die, an hour apart; every Z-0001 reading is 10 shots, A-0001 20, B-0001 30.
		const readings: ShotInput[] = [];
		for (let i = 0; i < 20; i++) {
			for (const [die, shots] of [
				['Z-0001', 10],
				['A-0001', 20],
				['B-0001', 30]
			] as const) {
				readings.push({
					die,
					shots,
					countedAt: hoursFromNow(-100 + i),
					machine: die === 'Z-0001' ? 'HC-08' : 'CC-84',
					key: `gw-${die}-${i}`
				});
			}
		}
		const batches = [0, 1, 2].map((b) => readings.slice(b * 20, b * 20 + 20));
		const reversed = batches.map((b) => [...b].reverse()).reverse();
		// Each process runs two gateways: one sends the batches in order, the other backwards; and
		// every gateway sends everything twice (a retry after a lost answer).
		const gateway = async (db: DB, list: ShotInput[][]) => {
			const answers: RecordResult[] = [];
			for (let round = 0; round < 2; round++) {
				for (const batch of list) answers.push(await post(db, batch));
			}
			return answers;
		};
		const answers = (
			await Promise.all([
				gateway(p.db, batches),
				gateway(p.db, reversed),
				gateway(other, batches),
				gateway(other, reversed)
			])
		).flat();

		for (const a of answers) expect(a.ok, JSON.stringify(!a.ok && a.issues)).toBe(true);
		const ok = answers.filter((a) => a.ok);
		// 4 gateways × 2 rounds × 60 readings were sent; 60 are new, the other 420 are duplicates.
		expect(ok.reduce((s, a) => s + a.accepted, 0)).toBe(60);
		expect(ok.reduce((s, a) => s + a.duplicates, 0)).toBe(420);
		const keys = await p.db.selectFrom('shot_entries').select('idem_key').execute();
		expect(keys.length).toBe(60);
		expect(new Set(keys.map((k) => k.idem_key)).size).toBe(60);
		// 20 × 10, 20 × 20, 20 × 30; each half of a die took every one of its shots.
		for (const [dieId, total] of [
			[p.dies.zinc, 200],
			[p.dies.alu, 400],
			[p.dies.bolt, 600]
		]) {
			const state = await ledgerState(other, dieId);
			expect(state.total).toBe(total);
			expect(state.ledgerSum).toBe(total);
			expect(state.dailySum).toBe(total);
			expect(state.halves.map((h) => h.shots)).toEqual([total, total]);
		}
	});

	test('one counter interval posted to both at once under different keys is counted once', async () => {
		const reading = (key: string): ShotInput[] => [
			{
				die: 'A-0001',
				shots: 400,
				counterStart: 10_000,
				counterEnd: 10_400,
				countedAt: hoursFromNow(-2),
				machine: 'CC-84',
				key
			}
		];
		const answers = await Promise.all([
			post(p.db, reading('left-1')),
			post(other, reading('right-1')),
			post(p.db, reading('left-2')),
			post(other, reading('right-2'))
		]);
		// Whichever came first counts; the other three see its interval and are refused.
		expect(answers.filter((a) => a.ok).length).toBe(1);
		for (const a of answers.filter((a) => !a.ok)) {
			expect(!a.ok && a.issues[0]).toMatchObject({ field: 'counterStart' });
		}
		expect((await ledgerState(p.db, p.dies.alu)).total).toBe(400);
	});

	test('a refused batch writes nothing while the other process counts the same readings', async () => {
		const good: ShotInput[] = Array.from({ length: 10 }, (_, i) => ({
			die: 'Z-0001',
			shots: 50,
			countedAt: hoursFromNow(-30 + i),
			key: `z-${i}`
		}));
		// The same ten plus a row for a die that does not exist: the whole batch is refused.
		const spoiled = [...good, { die: 'X-9999', shots: 5, countedAt: hoursFromNow(-1) }];
		const [refused, counted] = await Promise.all([post(p.db, spoiled), post(other, good)]);
		expect(refused.ok).toBe(false);
		expect(counted).toMatchObject({ ok: true, accepted: 10, duplicates: 0 });
		// 10 × 50, counted once, by the process whose batch was whole.
		const state = await ledgerState(p.db, p.dies.zinc);
		expect(state.total).toBe(500);
		expect(state.entries).toBe(10);
	});

	test('a half replaced in one process while the other posts shots loses no shot', async () => {
		// 20 posts of 10 shots, half an hour apart from 20 h before NOW; the new ejector goes in
		// 15 h before NOW, whichever of them commits first.
		const posts = Array.from({ length: 20 }, (_, i) =>
			post(other, [{ die: 'A-0001', shots: 10, countedAt: hoursFromNow(-20 + i * 0.5) }])
		);
		const ejector = {
			side: 'ejector' as const,
			serial: 'A-0001-E2',
			steel: 'H11',
			hardnessHrc: 47,
			reason: 'Crack across the ejector insert'
		};
		const [replaced] = await Promise.all([
			replaceHalf(p.db, p.dies.alu, ejector, LEAD, hoursFromNow(-15)),
			...posts
		]);
		expect(replaced.ok).toBe(true);
		expect((await ledgerState(p.db, p.dies.alu)).total).toBe(200);
		const halves = await listHalves(p.db, p.dies.alu);
		const cover = halves.find((h) => h.serial === 'A-0001-C1')!;
		const old = halves.find((h) => h.serial === 'A-0001-E1')!;
		const fresh = halves.find((h) => h.serial === 'A-0001-E2')!;
		// Posts i = 11…19 are dated after the replacement: 9 × 10 = 90 on the new ejector; i = 0…10
		// (the one at the very moment closes the old half's run): 11 × 10 = 110 on the old one.
		expect(fresh.shots).toBe(90);
		expect(old.shots).toBe(110);
		expect(cover.shots).toBe(200);
	});
});
