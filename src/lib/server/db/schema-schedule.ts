import type { Generated, Insertable, Selectable } from 'kysely';

/**
 * A press booking: one die on one press for a time window, for one order. A booking plans; it
 * writes nothing to the shot ledger when it ends (shots come from the ledger alone).
 */
export interface PressBookingsTable {
	id: Generated<number>;
	die_id: number;
	machine_id: number;
	/** ISO-8601 UTC; the booking covers [starts_at, ends_at). */
	starts_at: string;
	ends_at: string;
	order_ref: string;
	/** Good parts ordered. */
	parts: number;
	/** Expected scrap, percent of parts cast. */
	scrap_pct: Generated<number>;
	/** Planned press rate, shots per hour. */
	shots_per_hour: number;
	created_by: string | null;
	created_at: string;
	cancelled_at: string | null;
	cancelled_by: string | null;
	cancel_reason: string | null;
	notes: string | null;
	/** Why the planner set an end other than the worked-out one; null when it was worked out. */
	end_reason: string | null;
	updated_at: string | null;
	updated_by: string | null;
}

/** One create, edit or move of a booking, with the verdict before and after. */
export interface BookingChangesTable {
	id: Generated<number>;
	booking_id: number;
	changed_at: string;
	changed_by: string | null;
	token_id: number | null;
	kind: 'create' | 'edit';
	/** JSON: { field: [before, after] } for an edit, { field: value } for a create. */
	changes: string;
	verdict_before: 'fits' | 'warning' | 'blocked' | null;
	verdict_after: 'fits' | 'warning' | 'blocked';
	/** JSON array of the reasons behind verdict_after: [{ code, message }]. */
	reasons_after: Generated<string>;
}

/** What a press last reported through counted shots; one row per press. */
export interface PressFeedTable {
	machine_id: number;
	/** The die the last entry was credited to. */
	die_id: number | null;
	last_counter: number | null;
	/** ISO-8601 UTC, the press's time of the last reading. */
	last_counted_at: string;
	/** ISO-8601 UTC, when Castellan received it. */
	last_received_at: string;
	entries: Generated<number>;
}

// Tables of the schedule area; added to the Database interface in schema.ts.
export interface ScheduleTables {
	press_bookings: PressBookingsTable;
	booking_changes: BookingChangesTable;
	press_feed: PressFeedTable;
}

export type PressBooking = Selectable<PressBookingsTable>;
export type NewPressBooking = Insertable<PressBookingsTable>;
