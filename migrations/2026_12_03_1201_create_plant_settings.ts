import { TZDate } from '@date-fns/tz';
import { sql, type Kysely } from 'kysely';

// The plant's own settings, one row. The time zone decides where the plant's days begin: the
// daily shot roll-up (shot_daily.day) is keyed by plant date. Until now every day was a UTC day,
// so an existing plant starts on UTC and keeps its roll-up; PLANT_TIME_ZONE (an IANA name) lets
// a plant upgrade straight into its own zone, and the roll-up is then rebuilt from the ledger for
// that zone's day boundaries. Frozen in time: the rebuild here is its own, not the app's.

function validZone(zone: string | undefined): string | null {
	if (!zone?.trim()) return null;
	try {
		new Intl.DateTimeFormat('en-GB', { timeZone: zone.trim() });
		return zone.trim();
	} catch {
		console.warn(`PLANT_TIME_ZONE "${zone}" is not a known time zone; the plant starts on UTC.`);
		return null;
	}
}

const pad = (n: number) => String(n).padStart(2, '0');

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('plant_settings')
		.addColumn('id', 'integer', (c) => c.primaryKey().check(sql`id = 1`))
		.addColumn('time_zone', 'text', (c) => c.notNull().defaultTo('UTC'))
		.addColumn('updated_at', 'text')
		.addColumn('updated_by', 'text')
		.execute();
	const zone = validZone(process.env.PLANT_TIME_ZONE) ?? 'UTC';
	await db.insertInto('plant_settings').values({ id: 1, time_zone: zone }).execute();
	if (zone === 'UTC') return;

	// Minute buckets: every zone's offset is a whole number of minutes.
	const buckets = await sql<{ die_id: number; minute: string; shots: number }>`
		select die_id, substr(counted_at, 1, 16) as minute, sum(shots) as shots
		  from shot_entries group by die_id, minute`.execute(db);
	const days = new Map<string, { die_id: number; day: string; shots: number }>();
	for (const b of buckets.rows) {
		const d = new TZDate(Date.parse(`${b.minute}:00Z`), zone);
		const day = `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
		const key = `${b.die_id}|${day}`;
		const row = days.get(key);
		if (row) row.shots += b.shots;
		else days.set(key, { die_id: b.die_id, day, shots: b.shots });
	}
	await db.deleteFrom('shot_daily').execute();
	const rows = [...days.values()];
	for (let i = 0; i < rows.length; i += 300) {
		await db
			.insertInto('shot_daily')
			.values(rows.slice(i, i + 300))
			.execute();
	}
}

export async function down(db: Kysely<any>): Promise<void> {
	// Back to UTC days, as the roll-up was kept before this migration.
	await db.deleteFrom('shot_daily').execute();
	await sql`insert into shot_daily (die_id, day, shots)
		select die_id, substr(counted_at, 1, 10), sum(shots) from shot_entries
		 group by die_id, substr(counted_at, 1, 10)`.execute(db);
	await db.schema.dropTable('plant_settings').execute();
}
