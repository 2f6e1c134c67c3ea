// The plant's time zone: read, change, and the daily roll-up that depends on it.
import { sql } from 'kysely';
import { dateInZone, isTimeZone } from '../../calc/zone';
import { DEFAULT_PLANT_ZONE, setPlantZone } from '../../plant-time';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';

/**
 * The plant's IANA time zone from the settings; also makes it the zone this process shows times
 * in, so a second process or a restart follows an admin's change.
 */
export async function getPlantTimeZone(db: DB): Promise<string> {
	const row = await db
		.selectFrom('plant_settings')
		.select('time_zone')
		.where('id', '=', 1)
		.executeTakeFirst();
	const zone = row && isTimeZone(row.time_zone) ? row.time_zone : DEFAULT_PLANT_ZONE;
	setPlantZone(zone);
	return zone;
}

/**
 * Rebuilds the daily roll-up (shot_daily) from the ledger for the day boundaries of `zone`.
 * Entries are first summed per die and minute in SQL (every zone's offset is whole minutes), so
 * the work in JavaScript is per minute with shots, not per entry. Run inside the transaction that
 * changes the zone.
 */
export async function rebuildDailyRollup(db: DB, zone: string): Promise<number> {
	const buckets = await sql<{ die_id: number; minute: string; shots: number }>`
		select die_id, substr(counted_at, 1, 16) as minute, sum(shots) as shots
		  from shot_entries group by die_id, minute`.execute(db);
	const days = new Map<string, { die_id: number; day: string; shots: number }>();
	for (const b of buckets.rows) {
		const day = dateInZone(`${b.minute}:00Z`, zone);
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
	return rows.length;
}

export type ZoneResult = { ok: true; message: string } | { ok: false; message: string };

/**
 * Sets the plant's time zone. The roll-up is rebuilt for the new day boundaries in the same
 * transaction, so shots/day and trailing rates never mix two zones' days. Audited.
 */
export async function savePlantTimeZone(
	db: DB,
	zone: string,
	actorId: string,
	now = nowIso()
): Promise<ZoneResult> {
	const name = zone.trim();
	if (!isTimeZone(name)) {
		return { ok: false, message: `"${zone}" is not a time zone; pick one from the list.` };
	}
	const changed = await writeTransaction(
		db,
		async (trx) => {
			const before = await trx
				.selectFrom('plant_settings')
				.select('time_zone')
				.where('id', '=', 1)
				.executeTakeFirst();
			const previous = before?.time_zone ?? DEFAULT_PLANT_ZONE;
			if (previous === name) return false;
			await trx
				.insertInto('plant_settings')
				.values({ id: 1, time_zone: name, updated_at: now, updated_by: actorId })
				.onConflict((oc) =>
					oc.column('id').doUpdateSet({ time_zone: name, updated_at: now, updated_by: actorId })
				)
				.execute();
			const days = await rebuildDailyRollup(trx, name);
			await writeAudit(
				trx,
				{
					userId: actorId,
					action: 'settings.time_zone',
					detail: { from: previous, to: name, rollupRows: days }
				},
				now
			);
			return true;
		},
		// The roll-up is the ledger's: rebuilt under the ledger's lock, never beside a shot batch.
		'ledger'
	);
	setPlantZone(name);
	return {
		ok: true,
		message: changed
			? `Plant time zone set to ${name}; daily shot totals regrouped by the new days.`
			: `The plant already runs on ${name}.`
	};
}
