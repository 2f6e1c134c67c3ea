// Idempotency keys belong to a scope: the plant's (staff, plant-wide tokens) or one customer's
// (a customer-bound token). One owner cannot learn of, or take, another's keys; and a key sent
// again with a different count is refused with the original entry, never taken as a duplicate.
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { ingestShotBody } from '../../src/lib/server/shots/api-ingest';
import { recordShots, type LedgerActor } from '../../src/lib/server/shots/ledger';
import { hoursFromNow, makeShotPlant, NOW, plant, type ShotPlant } from './shots-fixture';

let p: ShotPlant;
let acme: LedgerActor;
let bolt: LedgerActor;
beforeEach(async () => {
	p = await makeShotPlant();
	acme = { userId: null, tokenId: null, customerId: p.owners.acme };
	bolt = { userId: null, tokenId: null, customerId: p.owners.bolt };
});
afterEach(async () => {
	await p.db.destroy();
});

const count = async (number: string) =>
	(
		await p.db
			.selectFrom('dies')
			.select('total_shots')
			.where('number', '=', number)
			.executeTakeFirstOrThrow()
	).total_shots;

describe('idempotency keys per scope', () => {
	it('lets two owners use the same key on their own dies without either hearing of the other', async () => {
		const a = await ingestShotBody(
			p.db,
			{ die: 'Z-0001', shots: 40, key: 'press-7:1000', countedAt: hoursFromNow(-2) },
			acme,
			NOW
		);
		expect(a.status).toBe(201);
		// The second owner's token sends the same key for its own die: counted, no word of the first.
		const b = await ingestShotBody(
			p.db,
			{ die: 'B-0001', shots: 25, key: 'press-7:1000', countedAt: hoursFromNow(-2) },
			bolt,
			NOW
		);
		expect(b).toMatchObject({ status: 201, body: { accepted: 1, duplicates: 0 } });
		expect(JSON.stringify(b.body)).not.toContain('Z-0001');
		// The plant's own scope is separate again.
		const staff = await recordShots(
			p.db,
			[{ die: 'A-0001', shots: 10, key: 'press-7:1000', countedAt: hoursFromNow(-1) }],
			plant,
			{ source: 'api', now: NOW }
		);
		expect(staff).toMatchObject({ ok: true, accepted: 1, duplicates: 0 });
		expect([await count('Z-0001'), await count('B-0001'), await count('A-0001')]).toEqual([
			40, 25, 10
		]);
	});

	it('acknowledges the same key with the same count as a duplicate, counting it once', async () => {
		const entry = { die: 'Z-0001', shots: 40, key: 'k-1', countedAt: hoursFromNow(-2) };
		expect((await ingestShotBody(p.db, entry, acme, NOW)).status).toBe(201);
		const again = await ingestShotBody(p.db, entry, acme, NOW);
		expect(again).toMatchObject({ status: 201, body: { accepted: 0, duplicates: 1 } });
		expect(await count('Z-0001')).toBe(40);
	});

	it('answers the same key with another count 409, with the original entry, and counts nothing', async () => {
		const entry = { die: 'Z-0001', shots: 40, key: 'k-2', countedAt: hoursFromNow(-2) };
		expect((await ingestShotBody(p.db, entry, acme, NOW)).status).toBe(201);
		const other = await ingestShotBody(p.db, { ...entry, shots: 41 }, acme, NOW);
		expect(other.status).toBe(409);
		expect(other.body).toMatchObject({
			original: { die: 'Z-0001', shots: 40, countedAt: hoursFromNow(-2) }
		});
		expect(await count('Z-0001')).toBe(40);
		// In a batch the row is named in the 400 and nothing of the batch is counted.
		const batch = await ingestShotBody(
			p.db,
			[
				{ die: 'A-0001', shots: 5, countedAt: hoursFromNow(-1) },
				{ ...entry, countedAt: hoursFromNow(-1) }
			],
			acme,
			NOW
		);
		expect(batch.status).toBe(400);
		expect(batch.body).toMatchObject({ issues: [{ index: 1, field: 'key' }] });
		expect(await count('A-0001')).toBe(0);
	});
});
