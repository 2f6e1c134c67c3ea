import { sql, type Kysely } from 'kysely';
import { autoId, float } from './portable';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Bookings that work out their own end time, and edits kept as history.
// - Each press gets its die-change and preheat time (minutes), added to the run time of every
//   booking on it. Existing presses take 90 min die change + 60 min preheat (common practice for a
//   mid-size cold- or hot-chamber press; the planner edits them on the press page).
// - A press may carry its usual rate and a die may override it (shots per hour); both start empty,
//   so existing plants keep the alloy family's usual rate until someone records one.
// - A booking keeps the reason when the planner overrode the worked-out end, and who changed it last.
// - booking_changes: one row per create / edit / move, with what changed and the verdict before
//   and after. Existing bookings start without history (nothing was recorded for them).

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.alterTable('machines')
		.addColumn('die_change_minutes', 'integer', (c) => c.notNull().defaultTo(90))
		.execute();
	await db.schema
		.alterTable('machines')
		.addColumn('preheat_minutes', 'integer', (c) => c.notNull().defaultTo(60))
		.execute();
	await db.schema.alterTable('machines').addColumn('shots_per_hour', float(db)).execute();
	await db.schema.alterTable('dies').addColumn('shots_per_hour', float(db)).execute();
	await db.schema.alterTable('press_bookings').addColumn('end_reason', 'text').execute();
	await db.schema.alterTable('press_bookings').addColumn('updated_at', 'text').execute();
	// Plain text (no reference) so the column can be dropped again by `down`.
	await db.schema.alterTable('press_bookings').addColumn('updated_by', 'text').execute();
	await db.schema
		.createTable('booking_changes')
		.addColumn('id', 'integer', autoId(db))
		.addColumn('booking_id', 'integer', (c) =>
			c.notNull().references('press_bookings.id').onDelete('cascade')
		)
		.addColumn('changed_at', 'text', (c) => c.notNull())
		.addColumn('changed_by', 'text', (c) => c.references('users.id').onDelete('set null'))
		.addColumn('token_id', 'integer', (c) => c.references('api_tokens.id').onDelete('set null'))
		.addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('create', 'edit')`))
		// JSON: { field: [before, after] } for an edit; { field: value } for a create.
		.addColumn('changes', 'text', (c) => c.notNull())
		.addColumn('verdict_before', 'text')
		.addColumn('verdict_after', 'text', (c) => c.notNull())
		// JSON array of the reasons behind verdict_after: [{ code, message }].
		.addColumn('reasons_after', 'text', (c) => c.notNull().defaultTo('[]'))
		.execute();
	await db.schema
		.createIndex('booking_changes_booking')
		.on('booking_changes')
		.columns(['booking_id', 'changed_at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('booking_changes').execute();
	for (const column of ['updated_by', 'updated_at', 'end_reason']) {
		await db.schema.alterTable('press_bookings').dropColumn(column).execute();
	}
	await db.schema.alterTable('dies').dropColumn('shots_per_hour').execute();
	for (const column of ['shots_per_hour', 'preheat_minutes', 'die_change_minutes']) {
		await db.schema.alterTable('machines').dropColumn(column).execute();
	}
}
