// Castellan's side of counts from the presses: a die whose counts arrive on a press is running
// there; another die counting on the same press takes its place; a quiet press lets its die go
// back to ready; the gateway's "which die is mounted" question is answered from counts, else
// from the booking under way.
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { ingestShotBody } from '../../src/lib/server/shots/api-ingest';
import {
	findMountedDie,
	listPressFeed,
	releaseIdleDies
} from '../../src/lib/server/schedule/press-feed';
import { makeShotPlant, NOW, hoursFromNow, type ShotPlant } from './shots-fixture';

const gateway = { userId: null, tokenId: null, customerId: null };
let plant: ShotPlant;

beforeEach(async () => {
	plant = await makeShotPlant();
});
afterEach(async () => {
	await plant.db.destroy();
});

const status = async (number: string) =>
	(
		await plant.db
			.selectFrom('dies')
			.select('status')
			.where('number', '=', number)
			.executeTakeFirstOrThrow()
	).status;

describe('press feed', () => {
	it('marks a ready die running when its counts arrive from a press, with a note', async () => {
		const answer = await ingestShotBody(
			plant.db,
			[
				{
					die: 'Z-0001',
					press: 'HC-08',
					shots: 40,
					counterStart: 1000,
					counterEnd: 1040,
					countedAt: hoursFromNow(-1),
					key: 'k1'
				}
			],
			gateway,
			NOW
		);
		expect(answer.status).toBe(201);
		expect(await status('Z-0001')).toBe('running');
		const note = await plant.db
			.selectFrom('audit_log')
			.select('detail')
			.where('action', '=', 'die.status')
			.where('die_id', '=', plant.dies.zinc)
			.executeTakeFirstOrThrow();
		expect(JSON.parse(note.detail)).toMatchObject({
			from: 'ready',
			to: 'running',
			reason: 'Counts arriving from press HC-08.'
		});
		const feed = await listPressFeed(plant.db, NOW);
		expect(feed).toEqual([
			expect.objectContaining({
				press: 'HC-08',
				die: 'Z-0001',
				lastCounter: 1040,
				lastCountedAt: hoursFromNow(-1),
				entries: 1
			})
		]);
		expect(await findMountedDie(plant.db, 'hc-08', NOW)).toEqual({
			press: 'HC-08',
			die: 'Z-0001',
			source: 'counts',
			since: hoursFromNow(-1)
		});
	});

	it('takes the previous die off the press when another die counts there', async () => {
		await ingestShotBody(
			plant.db,
			{ die: 'A-0001', press: 'CC-84', shots: 10, countedAt: hoursFromNow(-3) },
			gateway,
			NOW
		);
		expect(await status('A-0001')).toBe('running');
		await ingestShotBody(
			plant.db,
			{ die: 'B-0001', press: 'CC-84', shots: 12, countedAt: hoursFromNow(-1) },
			gateway,
			NOW
		);
		expect(await status('A-0001')).toBe('ready');
		expect(await status('B-0001')).toBe('running');
		expect((await findMountedDie(plant.db, 'CC-84', NOW))?.die).toBe('B-0001');
	});

	it('leaves a die in the toolroom where it is (the counts are still taken)', async () => {
		await plant.db
			.updateTable('dies')
			.set({ status: 'in_toolroom' })
			.where('id', '=', plant.dies.zinc)
			.execute();
		const answer = await ingestShotBody(
			plant.db,
			{ die: 'Z-0001', press: 'HC-08', shots: 5, countedAt: hoursFromNow(-1) },
			gateway,
			NOW
		);
		expect(answer.status).toBe(201);
		expect(await status('Z-0001')).toBe('in_toolroom');
	});

	it('sends a running die back to ready once its press has been quiet for the idle time', async () => {
		await ingestShotBody(
			plant.db,
			{ die: 'Z-0001', press: 'HC-08', shots: 5, countedAt: hoursFromNow(-1) },
			gateway,
			NOW
		);
		// Received at the real time of the call; 119 minutes later it is not yet idle, 121 it is.
		const received = (await listPressFeed(plant.db))[0].lastReceivedAt;
		const later = (min: number) => new Date(Date.parse(received) + min * 60_000).toISOString();
		expect(await releaseIdleDies(plant.db, 120, later(119))).toEqual([]);
		expect(await status('Z-0001')).toBe('running');
		expect(await releaseIdleDies(plant.db, 120, later(121))).toEqual(['Z-0001']);
		expect(await status('Z-0001')).toBe('ready');
		// A die set to running by hand, with no counts from a press, is not touched.
		await plant.db
			.updateTable('dies')
			.set({ status: 'running' })
			.where('id', '=', plant.dies.alu)
			.execute();
		expect(await releaseIdleDies(plant.db, 120, later(500))).toEqual([]);
		expect(await status('A-0001')).toBe('running');
	});

	it('answers the mounted die from the booking under way when no counts name one', async () => {
		const press = await plant.db
			.selectFrom('machines')
			.select('id')
			.where('name', '=', 'CC-84')
			.executeTakeFirstOrThrow();
		await plant.db
			.insertInto('press_bookings')
			.values({
				die_id: plant.dies.alu,
				machine_id: press.id,
				starts_at: hoursFromNow(-2),
				ends_at: hoursFromNow(6),
				order_ref: 'ORD-1',
				parts: 500,
				shots_per_hour: 90,
				created_by: null,
				created_at: NOW,
				cancelled_at: null,
				cancelled_by: null,
				cancel_reason: null,
				notes: null
			})
			.execute();
		expect(await findMountedDie(plant.db, 'CC-84', NOW)).toEqual({
			press: 'CC-84',
			die: 'A-0001',
			source: 'booking',
			since: hoursFromNow(-2)
		});
		// After the booking: nothing mounted; an unknown press is null (the route answers 404).
		expect((await findMountedDie(plant.db, 'CC-84', hoursFromNow(7)))?.die).toBeNull();
		expect(await findMountedDie(plant.db, 'XX-99', NOW)).toBeNull();
	});
});

describe('the board shows dies counting on a press', () => {
	it('lists the running die with its press in the board answer', async () => {
		const { loadBoard } = await import('../../src/lib/server/schedule/board');
		const { boardQuerySchema } = await import('../../src/lib/schemas/schedule');
		await ingestShotBody(
			plant.db,
			{ die: 'Z-0001', press: 'HC-08', shots: 5, countedAt: hoursFromNow(-1) },
			gateway,
			NOW
		);
		const board = await loadBoard(plant.db, boardQuerySchema.parse({}), { customerId: null }, NOW);
		const zinc = board.dies.rows.findIndex((r) => r[0] === 'Z-0001');
		expect(board.live.rows).toEqual([[zinc, 'HC-08', hoursFromNow(-1)]]);
	});
});
