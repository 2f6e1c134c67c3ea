import type { BoardData } from '../schedule/board';

/**
 * The one per-field policy for customer callers — a tooling owner's portal session or an API
 * token bound to a customer. It sits beside the owner portal (sharing.ts, portfolio.ts), which
 * shows an owner the same things: its dies' facts, life and service state; its bookings' dates,
 * press and quantities; toolroom jobs only once the plant shares them. Planner internals (order
 * reference, planned rate, scrap allowance, free-text notes) stay in the plant.
 *
 * Fields are allow-listed, so a field added to an answer later stays hidden from customers until
 * it is named here. Every API answer and export that a customer can reach goes through this file.
 */

/** Who an answer is for. */
export type Audience = 'plant' | 'customer';

/** A caller bound to a customer (portal user or customer-bound token) is a customer audience. */
export function audienceOf(scope: { customerId: number | null }): Audience {
	return scope.customerId === null ? 'plant' : 'customer';
}

/** The fields a customer may read, per kind of record. */
export const CUSTOMER_FIELDS = {
	die: [
		'number',
		'part',
		// The owner portal and its CSV show the part number too.
		'partNumber',
		'customer',
		'alloy',
		'family',
		'status',
		'totalShots',
		'expectedLifeShots',
		'lifeUsedPct',
		'nextService',
		'shotsPerDay',
		'projectedEndOfLife',
		'shotsRemaining',
		'lifeSide',
		'halves'
	],
	booking: [
		'id',
		'die',
		'part',
		'customer',
		'press',
		'startsAt',
		'endsAt',
		'parts',
		'shotsPlanned',
		'status',
		'cancelledAt'
	],
	/** The order check answers the caller's own question about its own die. */
	orderCheck: [
		'die',
		'status',
		'cavities',
		'totalShots',
		'shotsToNextService',
		'nextServiceKind',
		'shotsToEndOfLife',
		'shotsNeeded',
		'pressHours',
		'fits',
		'blockedBy',
		'shotsShort',
		'verdict',
		'reasons',
		'press',
		'from',
		'until',
		'shotsPerHour',
		'rateIsDefault'
	],
	boardBookingColumns: ['id', 'die', 'press', 'start', 'end', 'parts', 'phase'],
	boardDieColumns: ['number', 'part', 'owner', 'family', 'status', 'lifeUsedPct']
} as const satisfies Record<string, readonly string[]>;

export type CustomerRecordKind = 'die' | 'booking' | 'orderCheck';

/** The record as this audience may read it: unchanged for the plant, allow-listed for customers. */
export function viewFor<T extends object>(
	audience: Audience,
	kind: CustomerRecordKind,
	record: T
): Partial<T> {
	if (audience === 'plant') return record;
	const allowed: readonly string[] = CUSTOMER_FIELDS[kind];
	return Object.fromEntries(
		Object.entries(record).filter(([key]) => allowed.includes(key))
	) as Partial<T>;
}

/** A toolroom job reaches a customer only once the plant shared it (as in the owner portal). */
export function customerMaySeeJob(job: { shared: boolean }): boolean {
	return job.shared;
}

/** Column tables (the board's compact shape) with only the allowed columns kept. */
export function columnsFor<C extends readonly string[], R extends readonly unknown[]>(
	audience: Audience,
	allowed: readonly string[],
	table: { columns: C; rows: R[] }
): { columns: string[]; rows: unknown[][] } {
	if (audience === 'plant')
		return { columns: [...table.columns], rows: table.rows.map((r) => [...r]) };
	const keep = table.columns.map((c, i) => (allowed.includes(c) ? i : -1)).filter((i) => i >= 0);
	return {
		columns: keep.map((i) => table.columns[i]),
		rows: table.rows.map((r) => keep.map((i) => r[i]))
	};
}

/** The availability board as this audience may read it (its jobs are filtered in loadBoard). */
export function boardViewFor(audience: Audience, board: BoardData) {
	if (audience === 'plant') return board;
	return {
		...board,
		dies: columnsFor(audience, CUSTOMER_FIELDS.boardDieColumns, board.dies),
		bookings: columnsFor(audience, CUSTOMER_FIELDS.boardBookingColumns, board.bookings)
	};
}
