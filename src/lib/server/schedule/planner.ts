import type { DB } from '../db/connect';
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
