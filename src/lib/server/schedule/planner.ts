import type { UnitSystem } from '../../calc/units';
import type { DB } from '../db/connect';
import { listBookingsAtRisk, type BookingAtRisk } from './at-risk';
import { nowIso } from '../time';
import { listBookingsInWindow } from './bookings';

const DAY_MS = 86_400_000;

/** Active dies that cannot be booked today: in the toolroom or held. */
export async function listUnavailableDies(db: DB) {
	return db
		.selectFrom('dies')
		.innerJoin('customers', 'customers.id', 'dies.customer_id')
		.select([
			'dies.number',
			'dies.part_name as partName',
			'dies.status',
			'customers.name as customerName'
		])
		.where('dies.status', 'in', ['in_toolroom', 'held'])
		.orderBy('dies.number')
		.execute();
}

/** Counts for the planner's board summary over the next `days` days. */
export async function summarizeSchedule(db: DB, days = 14, now = nowIso()) {
	const end = new Date(Date.parse(now) + days * DAY_MS).toISOString();
	const [bookings, down] = await Promise.all([
		listBookingsInWindow(db, { start: now, end }, { customerId: null }),
		db.selectFrom('machines').select('name').where('status', '=', 'down').orderBy('name').execute()
	]);
	return {
		bookings: bookings.length,
		dies: new Set(bookings.map((b) => b.die_id)).size,
		presses: new Set(bookings.map((b) => b.machine_id)).size,
		pressesDown: down.map((m) => m.name)
	};
}

/** One booking needing a decision, as the planner home lists it. */
export interface DecisionRow {
	id: number;
	dieNumber: string;
	partName: string;
	pressName: string;
	startsAt: string;
	orderRef: string;
	verdict: 'warning' | 'blocked';
	/** The first reason, then how many more. */
	reason: string;
	more: number;
}

export interface DecisionList {
	total: number;
	rows: DecisionRow[];
}

const rowOf = (r: BookingAtRisk): DecisionRow => {
	const reasons = [...r.blocks, ...r.warnings];
	return {
		id: r.booking.id,
		dieNumber: r.booking.dieNumber,
		partName: r.booking.partName,
		pressName: r.booking.pressName,
		startsAt: r.booking.starts_at,
		orderRef: r.booking.order_ref,
		verdict: r.blocks.length ? 'blocked' : 'warning',
		reason: reasons[0]?.message ?? '',
		more: Math.max(0, reasons.length - 1)
	};
};

/**
 * What needs the planner's decision, from the one verdict (`listBookingsAtRisk` runs
 * `assessRun` on every booking of the horizon):
 * - blocked: bookings that cannot run as booked;
 * - unconfirmed: bookings with a kind of warning nobody accepted — not among those recorded
 *   when the booking was last saved (or it has no record);
 * - serviceFirst: dies whose service falls due by or during their next booking (its first
 *   booking in the horizon carries a service warning), so the service has to be planned first.
 * `limit` rows each; `total` counts them all.
 */
export async function listPlannerDecisions(
	db: DB,
	days: number,
	now = nowIso(),
	units: UnitSystem = 'metric',
	limit = 5
) {
	const atRisk = await listBookingsAtRisk(db, days, now, units);
	const ids = atRisk.map((r) => r.booking.id);
	const recorded = ids.length
		? await db
				.selectFrom('booking_changes')
				.select(['booking_id', 'reasons_after'])
				.where('id', 'in', (eb) =>
					eb
						.selectFrom('booking_changes')
						.select((e) => e.fn.max('id').as('id'))
						.where('booking_id', 'in', ids)
						.groupBy('booking_id')
				)
				.execute()
		: [];
	// By code: a warning's wording moves with time (dates, shots left); its kind does not.
	const accepted = new Map(
		recorded.map((r) => [
			r.booking_id,
			new Set((JSON.parse(r.reasons_after) as { code: string }[]).map((c) => c.code))
		])
	);
	const blocked = atRisk.filter((r) => r.blocks.length > 0);
	const unconfirmed = atRisk.filter(
		(r) =>
			r.blocks.length === 0 &&
			r.warnings.some((w) => !(accepted.get(r.booking.id)?.has(w.code) ?? false))
	);
	// Each die's first booking of the horizon, at risk or not.
	const horizonEnd = new Date(Date.parse(now) + days * DAY_MS).toISOString();
	const firstIds = new Set<number>();
	const seenDies = new Set<number>();
	for (const b of await listBookingsInWindow(
		db,
		{ start: now, end: horizonEnd },
		{ customerId: null }
	)) {
		if (seenDies.has(b.die_id)) continue;
		seenDies.add(b.die_id);
		firstIds.add(b.id);
	}
	const serviceFirst = atRisk
		.filter((r) => firstIds.has(r.booking.id) && r.warnings.some((w) => w.code === 'service_due'))
		.sort((a, b) => a.booking.starts_at.localeCompare(b.booking.starts_at))
		.map((r) => ({
			...rowOf(r),
			reason: r.warnings.find((w) => w.code === 'service_due')!.message
		}));
	const list = (rows: DecisionRow[], all: boolean): DecisionList => ({
		total: rows.length,
		rows: all ? rows : rows.slice(0, limit)
	});
	return {
		all: (which: 'blocked' | 'unconfirmed' | 'serviceFirst' | 'risk') =>
			list(
				which === 'blocked'
					? blocked.map(rowOf)
					: which === 'unconfirmed'
						? unconfirmed.map(rowOf)
						: which === 'serviceFirst'
							? serviceFirst
							: atRisk.map(rowOf),
				true
			),
		blocked: list(blocked.map(rowOf), false),
		unconfirmed: list(unconfirmed.map(rowOf), false),
		serviceFirst: list(serviceFirst, false),
		atRiskTotal: atRisk.length
	};
}
