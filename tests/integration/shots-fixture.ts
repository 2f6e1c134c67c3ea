// A small plant for the shot-ledger tests: two owners, two presses, four dies (one retired),
// each with both halves. Built with plain inserts so the ledger starts empty.
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import type { LedgerActor } from '../../src/lib/server/shots/ledger';

export const NOW = '2026-06-10T12:00:00.000Z';
export const LEAD = 'u-lead';
export const plant: LedgerActor = { userId: LEAD, tokenId: null, customerId: null };

export interface ShotPlant {
	db: DB;
	owners: { acme: number; bolt: number };
	dies: Record<'zinc' | 'alu' | 'bolt' | 'retired', number>;
}

/** ISO instant `hours` after (or before, if negative) NOW. */
export const hoursFromNow = (hours: number) =>
	new Date(Date.parse(NOW) + hours * 3_600_000).toISOString();

export async function makeShotPlant(): Promise<ShotPlant> {
	const db = await openTestDatabase();
	await db
		.insertInto('users')
		.values({
			id: LEAD,
			email: 'lead@plant.test',
			name: 'Lead',
			role: 'toolroom_lead',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	const [acme, bolt] = await Promise.all(
		['ACME', 'BOLT'].map(async (code) => {
			const r = await db
				.insertInto('customers')
				.values({ code, name: `${code} Ltd` })
				.returning('id')
				.executeTakeFirstOrThrow();
			return r.id;
		})
	);
	await db
		.insertInto('machines')
		.values([
			{ name: 'HC-08', chamber: 'hot', clamp_force_kn: 785 },
			{ name: 'CC-84', chamber: 'cold', clamp_force_kn: 8238 }
		])
		.execute();
	const alloys = new Map(
		(await db.selectFrom('alloys').select(['id', 'code']).execute()).map((a) => [a.code, a.id])
	);
	const created = '2026-01-01T00:00:00.000Z';
	async function die(
		number: string,
		customerId: number,
		alloy: string,
		process: 'hot_chamber' | 'cold_chamber',
		status: 'ready' | 'retired' = 'ready'
	) {
		const row = await db
			.insertInto('dies')
			.values({
				number,
				part_name: `Part ${number}`,
				part_number: null,
				customer_id: customerId,
				alloy_id: alloys.get(alloy)!,
				process,
				cavities: 2,
				projected_area_cm2: 300,
				status,
				location: null,
				notes: null,
				expected_life_shots: null,
				created_at: created,
				updated_at: created,
				retired_at: status === 'retired' ? created : null
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await db
			.insertInto('die_halves')
			.values(
				(['cover', 'ejector'] as const).map((side) => ({
					die_id: row.id,
					side,
					serial: `${number}-${side === 'cover' ? 'C' : 'E'}1`,
					steel: 'H13',
					hardness_hrc: 46,
					installed_at: created
				}))
			)
			.execute();
		return row.id;
	}
	return {
		db,
		owners: { acme, bolt },
		dies: {
			zinc: await die('Z-0001', acme, 'ZP0400', 'hot_chamber'),
			alu: await die('A-0001', acme, 'A380', 'cold_chamber'),
			bolt: await die('B-0001', bolt, 'A380', 'cold_chamber'),
			retired: await die('R-0001', acme, 'A380', 'cold_chamber', 'retired')
		}
	};
}

/** Everything the totals must agree with, read back from the database. */
export async function ledgerState(db: DB, dieId: number) {
	const [die, entries, daily, halves, days] = await Promise.all([
		db.selectFrom('dies').select(['total_shots']).where('id', '=', dieId).executeTakeFirstOrThrow(),
		db
			.selectFrom('shot_entries')
			.select((eb) => [
				eb.fn.coalesce(eb.fn.sum<number>('shots'), eb.lit(0)).as('sum'),
				eb.fn.countAll<number>().as('n')
			])
			.where('die_id', '=', dieId)
			.executeTakeFirstOrThrow(),
		db
			.selectFrom('shot_daily')
			.select((eb) => eb.fn.coalesce(eb.fn.sum<number>('shots'), eb.lit(0)).as('sum'))
			.where('die_id', '=', dieId)
			.executeTakeFirstOrThrow(),
		db
			.selectFrom('die_halves')
			.select(['side', 'shots', 'active', 'die_shots_at_install'])
			.where('die_id', '=', dieId)
			.execute(),
		db
			.selectFrom('shot_entries')
			.select((eb) => [
				eb.fn('substr', ['counted_at', eb.lit(1), eb.lit(10)]).as('day'),
				eb.fn.sum<number>('shots').as('sum')
			])
			.where('die_id', '=', dieId)
			.groupBy('day')
			.execute()
	]);
	return {
		total: die.total_shots,
		ledgerSum: Number(entries.sum),
		entries: Number(entries.n),
		dailySum: Number(daily.sum),
		halves,
		ledgerDays: new Map(days.map((d) => [String(d.day), Number(d.sum)]))
	};
}

/** A full snapshot of the tables a refused write must leave alone. */
export async function snapshot(db: DB) {
	const [entries, daily, dies, halves, audit] = await Promise.all([
		db.selectFrom('shot_entries').selectAll().orderBy('id').execute(),
		db.selectFrom('shot_daily').selectAll().orderBy('die_id').orderBy('day').execute(),
		db
			.selectFrom('dies')
			.select(['id', 'total_shots', 'last_counted_at', 'updated_at'])
			.orderBy('id')
			.execute(),
		db.selectFrom('die_halves').selectAll().orderBy('id').execute(),
		db.selectFrom('audit_log').selectAll().orderBy('id').execute()
	]);
	return { entries, daily, dies, halves, audit };
}
