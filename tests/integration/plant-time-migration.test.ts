// Upgrading an existing plant database: the plant settings migration starts the plant on UTC
// (its roll-up was kept by UTC days) or, with PLANT_TIME_ZONE, on that zone with the daily
// roll-up rebuilt from the ledger for the zone's days.
import { Migrator, type MigrationProvider } from 'kysely';
import { afterEach, describe, expect, test, vi } from 'vitest';
import { migrations } from '../../migrations/index';
import { openDatabase, testEngine, type DB } from '../../src/lib/server/db/connect';

const TARGET = '2026_12_03_1201_create_plant_settings';
const provider: MigrationProvider = { getMigrations: async () => migrations };

async function databaseBefore(): Promise<DB> {
	const db = openDatabase(':memory:');
	const names = Object.keys(migrations);
	const before = names[names.indexOf(TARGET) - 1];
	const { error } = await new Migrator({ db, provider }).migrateTo(before);
	if (error) throw error;
	// One die with two runs on the UTC day 2026-06-09 (12:00 and 21:30 UTC), roll-up by UTC day.
	const customer = await db
		.insertInto('customers')
		.values({ code: 'ACME', name: 'Acme' })
		.returning('id')
		.executeTakeFirstOrThrow();
	const alloy = await db.selectFrom('alloys').select('id').executeTakeFirstOrThrow();
	const die = await db
		.insertInto('dies')
		.values({
			number: 'M-0001',
			part_name: 'Part',
			part_number: null,
			customer_id: customer.id,
			alloy_id: alloy.id,
			process: 'hot_chamber',
			cavities: 1,
			projected_area_cm2: 100,
			status: 'ready',
			location: null,
			notes: null,
			expected_life_shots: null,
			created_at: '2026-01-01T00:00:00.000Z',
			updated_at: '2026-01-01T00:00:00.000Z',
			retired_at: null,
			total_shots: 150
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	const entry = (counted_at: string, shots: number) => ({
		die_id: die.id,
		machine_id: null,
		counted_at,
		shots,
		counter_start: null,
		counter_end: null,
		source: 'manual' as const,
		idem_key: null,
		entered_by: null,
		token_id: null,
		note: null,
		created_at: counted_at
	});
	await db
		.insertInto('shot_entries')
		.values([entry('2026-06-09T12:00:00.000Z', 50), entry('2026-06-09T21:30:00.000Z', 100)])
		.execute();
	await db
		.insertInto('shot_daily')
		.values({ die_id: die.id, day: '2026-06-09', shots: 150 })
		.execute();
	return db;
}

async function upgrade(db: DB) {
	const { error } = await new Migrator({ db, provider }).migrateTo(TARGET);
	if (error) throw error;
	const zone = await db.selectFrom('plant_settings').select('time_zone').executeTakeFirstOrThrow();
	const daily = await db.selectFrom('shot_daily').select(['day', 'shots']).orderBy('day').execute();
	return { zone: zone.time_zone, daily };
}

afterEach(() => {
	delete process.env.PLANT_TIME_ZONE;
});

// Upgrades a SQLite plant database from an older schema; PostgreSQL databases start at the latest
// schema (nothing to upgrade), and every other test runs the migrations on PostgreSQL.
describe.skipIf(testEngine() === 'postgres')('plant settings migration', () => {
	test('an existing plant starts on UTC and keeps its roll-up', async () => {
		const db = await databaseBefore();
		expect(await upgrade(db)).toEqual({
			zone: 'UTC',
			daily: [{ day: '2026-06-09', shots: 150 }]
		});
	});

	test('with PLANT_TIME_ZONE the roll-up is rebuilt for that zone’s days', async () => {
		process.env.PLANT_TIME_ZONE = 'Australia/Brisbane';
		const db = await databaseBefore();
		// UTC+10: 12:00 UTC is 22:00 on the 9th; 21:30 UTC is 07:30 on the 10th.
		expect(await upgrade(db)).toEqual({
			zone: 'Australia/Brisbane',
			daily: [
				{ day: '2026-06-09', shots: 50 },
				{ day: '2026-06-10', shots: 100 }
			]
		});
	});

	test('an unknown PLANT_TIME_ZONE is reported and the plant starts on UTC', async () => {
		process.env.PLANT_TIME_ZONE = 'Nowhere/Special';
		const warn = vi.spyOn(console, 'warn').mockImplementation(() => {});
		const db = await databaseBefore();
		const r = await upgrade(db);
		expect(warn).toHaveBeenCalledWith(
			'PLANT_TIME_ZONE "Nowhere/Special" is not a known time zone; the plant starts on UTC.'
		);
		warn.mockRestore();
		expect(r.zone).toBe('UTC');
		expect(r.daily).toEqual([{ day: '2026-06-09', shots: 150 }]);
	});
});
