import { sql, type Kysely } from 'kysely';
import { autoId, float } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Facts the order verdict, the fleet statistics and the crack trend need:
// - dies.metal_pressure_bar: the die's own intensification (metal) pressure. Existing dies get the
//   starting value Castellan used for them until now (hot chamber 150 bar; cold chamber by family:
//   aluminium 600, magnesium 500, copper 400, zinc 300 — calc/clamp DEFAULT_METAL_PRESSURE_BAR), so
//   an upgraded plant's clamping checks answer as before until someone records the real figure.
// - dies.retirement_reason: why a die was retired. Until now every retired die counted as worn out
//   in the fleet fit, so existing retired dies keep that meaning ('worn_out').
// - die_zones: the per-die list of surface zones, kept by the toolroom lead, one half each.
//   Existing free-text zones of surface inspections become list entries.
// - surface_inspections.zone_id / half_id: the zone from that list and the physical half (by
//   serial) the inspection looked at; existing rows are linked to the half installed at the time.
// - job_repairs: which zones a toolroom job repaired, and how (weld, insert change, re-machining);
//   a crack series restarts after such a repair.
// - die_halves.picture_photo_id: an optional picture of the half to pick zones from.
// - alloys.specific_heat_liquid_j_kgk: the liquid's specific heat, apart from the solid's. The
//   reference alloys get their base metal's liquid heat capacity (NIST-JANAF, from memory: Al
//   1 177, Mg 1 411, Zn 480, Cu 516 J/(kg·K)); plant-added alloys stay empty and the heat balance
//   uses the solid's value for them, saying so.
// - toolroom_jobs.expected_release_at: when the toolroom expects to give the die back (optional).

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('dies').addColumn('metal_pressure_bar', float(db)).execute();
	await sql`update dies set metal_pressure_bar = case
		when process = 'hot_chamber' then 150
		else (select case alloys.family
			when 'aluminium' then 600 when 'magnesium' then 500 when 'copper' then 400 else 300 end
			from alloys where alloys.id = dies.alloy_id)
		end`.execute(db);

	await db.schema.alterTable('dies').addColumn('retirement_reason', 'text').execute();
	await sql`update dies set retirement_reason = 'worn_out' where status = 'retired'`.execute(db);

	await db.schema
		.createTable('die_zones')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('die_id', 'integer', (c) => c.notNull().references('dies.id'))
		.addColumn('half', 'text', (c) => c.notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('active', 'integer', (c) => c.notNull().defaultTo(1))
		.addColumn('created_at', 'text', (c) => c.notNull())
		.addCheckConstraint('die_zones_half_check', sql`half in ('cover','ejector')`)
		.execute();
	await db.schema
		.createIndex('die_zones_unique')
		.on('die_zones')
		.columns(['die_id', 'half', 'name'])
		.unique()
		.execute();

	await db.schema
		.alterTable('surface_inspections')
		.addColumn('zone_id', 'integer', (c) => c.references('die_zones.id'))
		.execute();
	await db.schema
		.alterTable('surface_inspections')
		.addColumn('half_id', 'integer', (c) => c.references('die_halves.id'))
		.execute();
	await sql`insert into die_zones (die_id, half, name, active, created_at)
		select die_id, half, zone, 1, min(inspected_at) from surface_inspections
		group by die_id, half, zone`.execute(db);
	await sql`update surface_inspections set zone_id = (select z.id from die_zones z
		where z.die_id = surface_inspections.die_id and z.half = surface_inspections.half
		and z.name = surface_inspections.zone)`.execute(db);
	// The half installed when the inspection was made; the latest install wins a tie.
	await sql`update surface_inspections set half_id = (select h.id from die_halves h
		where h.die_id = surface_inspections.die_id and h.side = surface_inspections.half
		and h.installed_at <= surface_inspections.inspected_at
		and (h.removed_at is null or h.removed_at > surface_inspections.inspected_at)
		order by h.installed_at desc, h.id desc limit 1)`.execute(db);

	await db.schema
		.createTable('job_repairs')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('job_id', 'integer', (c) => c.notNull().references('toolroom_jobs.id'))
		.addColumn('zone_id', 'integer', (c) => c.notNull().references('die_zones.id'))
		.addColumn('kind', 'text', (c) => c.notNull())
		.addCheckConstraint(
			'job_repairs_kind_check',
			sql`kind in ('weld','insert_change','remachining')`
		)
		.execute();
	await db.schema
		.createIndex('job_repairs_unique')
		.on('job_repairs')
		.columns(['job_id', 'zone_id'])
		.unique()
		.execute();

	await db.schema
		.alterTable('die_halves')
		.addColumn('picture_photo_id', 'integer', (c) => c.references('photos.id'))
		.execute();
	await db.schema.alterTable('toolroom_jobs').addColumn('expected_release_at', 'text').execute();

	await db.schema.alterTable('alloys').addColumn('specific_heat_liquid_j_kgk', float(db)).execute();
	for (const [code, cp] of [
		['ZP0400', 480],
		['ZP0410', 480],
		['AZ91D', 1411],
		['A380', 1177],
		['EN-AC-46000', 1177],
		['CW617N', 516]
	] as const) {
		await db
			.updateTable('alloys')
			.set({ specific_heat_liquid_j_kgk: cp })
			.where('code', '=', code)
			.execute();
	}
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('alloys').dropColumn('specific_heat_liquid_j_kgk').execute();
	await db.schema.alterTable('toolroom_jobs').dropColumn('expected_release_at').execute();
	await db.schema.alterTable('die_halves').dropColumn('picture_photo_id').execute();
	await db.schema.dropTable('job_repairs').execute();
	await db.schema.alterTable('surface_inspections').dropColumn('half_id').execute();
	await db.schema.alterTable('surface_inspections').dropColumn('zone_id').execute();
	await db.schema.dropTable('die_zones').execute();
	await db.schema.alterTable('dies').dropColumn('retirement_reason').execute();
	await db.schema.alterTable('dies').dropColumn('metal_pressure_bar').execute();
}
