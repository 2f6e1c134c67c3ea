// Demo data for the shot ledger (invented): halves replaced part-way through the history (the
// D-0127 cover with entries on both sides of it), a correction with its reason, press runs typed
// in with counter readings, and a gateway count for a held die waiting for review. Runs after
// seedDemo; touches only D-0126, D-0127, D-0128 and D-0143, which no e2e test uses.
import type { DB } from '../../src/lib/server/db/connect';
import { replaceHalf } from '../../src/lib/server/dies/halves';
import { recordShots } from '../../src/lib/server/shots/ledger';

const DAY = 86_400_000;

export async function seedDemoShots(db: DB, now = new Date()): Promise<void> {
	const lead = await db
		.selectFrom('users')
		.select('id')
		.where('role', '=', 'toolroom_lead')
		.executeTakeFirstOrThrow();
	const planner = await db
		.selectFrom('users')
		.select('id')
		.where('role', '=', 'scheduler')
		.executeTakeFirstOrThrow();
	const dieId = async (number: string) =>
		(
			await db
				.selectFrom('dies')
				.select('id')
				.where('number', '=', number)
				.executeTakeFirstOrThrow()
		).id;

	// D-0126: the ejector half cracked 120 days ago and was replaced. The old half keeps the count
	// it had then (from the daily roll-up), the new one everything since.
	const d126 = await dieId('D-0126');
	const at = new Date(now.getTime() - 120 * DAY);
	at.setUTCHours(9, 30, 0, 0);
	const day = at.toISOString().slice(0, 10);
	const [{ before }, die] = await Promise.all([
		db
			.selectFrom('shot_daily')
			.select((eb) => eb.fn.coalesce(eb.fn.sum<number>('shots'), eb.lit(0)).as('before'))
			.where('die_id', '=', d126)
			.where('day', '<', day)
			.executeTakeFirstOrThrow(),
		db.selectFrom('dies').select('total_shots').where('id', '=', d126).executeTakeFirstOrThrow()
	]);
	const atInstall = Number(before);
	const reason = 'Crack from the ejector-pin hole into the cavity; insert beyond weld repair';
	await db.transaction().execute(async (trx) => {
		const old = await trx
			.updateTable('die_halves')
			.set({ active: 0, shots: atInstall, removed_at: at.toISOString(), removal_reason: reason })
			.where('die_id', '=', d126)
			.where('side', '=', 'ejector')
			.where('active', '=', 1)
			.returning('serial')
			.executeTakeFirstOrThrow();
		await trx
			.insertInto('die_halves')
			.values({
				die_id: d126,
				side: 'ejector',
				serial: 'D-0126-E2',
				steel: '1.2367',
				hardness_hrc: 47,
				shots: die.total_shots - atInstall,
				active: 1,
				installed_at: at.toISOString(),
				die_shots_at_install: atInstall
			})
			.execute();
		await trx
			.insertInto('audit_log')
			.values({
				at: at.toISOString(),
				user_id: lead.id,
				action: 'half.replace',
				die_id: d126,
				detail: JSON.stringify({
					side: 'ejector',
					removed: { serial: old.serial, shots: atInstall },
					installed: { serial: 'D-0126-E2', steel: '1.2367', hardnessHrc: 47 },
					dieShots: atInstall,
					reason
				})
			})
			.execute();
	});

	// D-0127: a correction for dry cycles the counter took during a press repair.
	const corrected = await recordShots(
		db,
		[
			{
				die: 'D-0127',
				shots: -340,
				countedAt: new Date(now.getTime() - 9 * DAY).toISOString(),
				note: 'Counter ran on 340 dry cycles while the press was set up after its repair'
			}
		],
		{ userId: lead.id, tokenId: null, customerId: null },
		{ source: 'correction', now: now.toISOString() }
	);
	if (!corrected.ok)
		throw new Error(`Demo correction refused: ${JSON.stringify(corrected.issues)}`);

	// D-0128: the planner typed in today's run from the press counter.
	const run = await recordShots(
		db,
		[
			{
				die: 'D-0128',
				shots: 640,
				counterStart: 1_204_310,
				counterEnd: 1_204_950,
				machine: 'HC-42M',
				countedAt: new Date(now.getTime() - 2 * 3_600_000).toISOString(),
				note: 'Order 4471, early shift'
			}
		],
		{ userId: planner.id, tokenId: null, customerId: null },
		{ source: 'manual', now: now.toISOString() }
	);
	if (!run.ok) throw new Error(`Demo press run refused: ${JSON.stringify(run.issues)}`);

	// D-0127: the cover half was replaced half-way through its history. The replacement is booked
	// at its real time, so the entries on either side of it count on the half that was in the die
	// then: the old cover keeps the first half of the history, the new one the rest.
	const d127 = await dieId('D-0127');
	const span = await db
		.selectFrom('shot_entries')
		.select((eb) => [eb.fn.min('counted_at').as('first'), eb.fn.max('counted_at').as('last')])
		.where('die_id', '=', d127)
		.where('voided_at', 'is', null)
		.executeTakeFirstOrThrow();
	const mid = new Date((Date.parse(span.first!) + Date.parse(span.last!)) / 2);
	mid.setUTCHours(7, 15, 0, 0);
	const replaced = await replaceHalf(
		db,
		d127,
		{
			side: 'cover',
			serial: 'D-0127-C2',
			steel: 'H13 ESR',
			hardnessHrc: 46,
			reason: 'Heat checking across the gate land, grade 4; cover insert beyond polishing'
		},
		lead.id,
		mid.toISOString()
	);
	if (!replaced.ok) throw new Error(`Demo half replacement refused: ${replaced.message}`);

	// D-0143 is held, yet the press-counter gateway sent a count for it: accepted (a gateway must
	// not lose counts) with a warning, and waiting on the toolroom lead's review.
	const gateway = await db
		.selectFrom('api_tokens')
		.select('id')
		.where('name', '=', 'Demo press-counter gateway')
		.executeTakeFirst();
	const flagged = await recordShots(
		db,
		[
			{
				die: 'D-0143',
				shots: 180,
				machine: 'CC-25B',
				countedAt: new Date(now.getTime() - 5 * 3_600_000).toISOString(),
				key: 'demo-gateway-d0143-1'
			}
		],
		{ userId: null, tokenId: gateway?.id ?? null, customerId: null },
		{ source: 'api', now: now.toISOString(), onWarning: 'review' }
	);
	if (!flagged.ok) throw new Error(`Demo gateway count refused: ${JSON.stringify(flagged.issues)}`);
}
