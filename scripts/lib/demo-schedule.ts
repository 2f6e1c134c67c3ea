// Press bookings for the demo plant (invented): the coming weeks on presses that fit each die,
// a few runs in the past, and one booking that went bad when its die went to the toolroom.
// Every booking except that last one goes through the same checks as the booking form.
import type { DB } from '../../src/lib/server/db/connect';
import {
	chamberChecks,
	dieClampRequirement,
	findClashes
} from '../../src/lib/server/schedule/verdict';
import { createBooking } from '../../src/lib/server/schedule/bookings';
import {
	defaultShotsPerHour,
	loadDieFacts,
	type DieFacts
} from '../../src/lib/server/schedule/die-facts';

const HOUR_MS = 3_600_000;
const DAY_MS = 24 * HOUR_MS;
/** Dies the schedule e2e journey books or tries to; the demo leaves them free. */
const KEEP_FREE = new Set(['D-0107', 'D-0119', 'D-0129', 'D-0135', 'D-0140']);
const HORIZON_DAYS = 35;
const CHANGEOVER_H = 6;

function fits(
	die: DieFacts,
	press: { name: string; chamber: 'hot' | 'cold'; clamp_force_kn: number }
) {
	const blocked = chamberChecks(die, press as never).some((c) => c.level === 'block');
	return !blocked && dieClampRequirement(die).requiredKn <= press.clamp_force_kn;
}

/**
 * Parts for a booking of `hours` at the alloy's usual rate, a little under capacity, in hundreds;
 * the press's die change and preheat come out of the booked time first.
 */
function partsFor(
	die: DieFacts,
	hours: number,
	press: { die_change_minutes: number; preheat_minutes: number }
) {
	const casting = hours - (press.die_change_minutes + press.preheat_minutes) / 60;
	const shots = casting * defaultShotsPerHour(die.family) * 0.85;
	return Math.max(100, Math.floor((shots * die.cavities * 0.97) / 100) * 100);
}

export interface ScheduleSeedSummary {
	bookings: number;
	past: number;
	skipped: number;
}

/** Adds the demo bookings; call after the demo plant (dies, presses, ledger) is in place. */
export async function seedScheduleDemo(db: DB, now: Date): Promise<ScheduleSeedSummary> {
	const planner = await db
		.selectFrom('users')
		.select('id')
		.where('role', '=', 'scheduler')
		.executeTakeFirst();
	const actor = { userId: planner?.id ?? null, tokenId: null, customerId: null };
	const nowIso = now.toISOString();
	const presses = await db
		.selectFrom('machines')
		.selectAll()
		.where('status', '=', 'available')
		.orderBy('name')
		.execute();
	const numbers = await db
		.selectFrom('dies')
		.select('number')
		.where('status', 'in', ['ready', 'running'])
		.orderBy('number')
		.execute();
	const dies: DieFacts[] = [];
	for (const { number } of numbers) {
		if (KEEP_FREE.has(number)) continue;
		const facts = await loadDieFacts(db, number, { customerId: null }, nowIso);
		if (facts) dies.push(facts);
	}

	// Each press works through the dies that fit it, one run after another from tomorrow 06:00.
	const firstShift = Date.parse(nowIso.slice(0, 10)) + DAY_MS + 6 * HOUR_MS;
	const cursor = new Map(presses.map((p) => [p.id, firstShift]));
	const horizon = firstShift + HORIZON_DAYS * DAY_MS;
	let bookings = 0;
	let skipped = 0;
	let order = 4100;
	let warned = 0;
	for (let round = 0; round < 3; round++) {
		for (const [i, die] of dies.entries()) {
			const candidates = presses.filter((p) => fits(die, p));
			if (candidates.length === 0) continue;
			const press = candidates.reduce((a, b) => (cursor.get(b.id)! < cursor.get(a.id)! ? b : a));
			const start = cursor.get(press.id)!;
			if (start >= horizon) continue;
			const hours = 8 * (1 + ((i + round) % 3));
			const end = start + hours * HOUR_MS;
			const input = {
				die: die.number,
				press: press.name,
				startsAt: new Date(start).toISOString(),
				endsAt: new Date(end).toISOString(),
				parts: partsFor(die, hours, press),
				scrapPct: die.family === 'aluminium' ? 4 : 2,
				shotsPerHour: defaultShotsPerHour(die.family),
				orderRef: `SO-${order}`,
				endReason: 'Booked to whole shifts'
			};
			let result = await createBooking(db, input, actor, { confirm: false, now: nowIso });
			// A planner books past a warning now and then (the planner home then lists the run as at
			// risk); otherwise the die waits for its service and the slot goes to the next die.
			if (!result.ok && result.kind === 'confirm' && warned++ % 5 === 0) {
				result = await createBooking(db, input, actor, { confirm: true, now: nowIso });
			}
			if (!result.ok) {
				skipped++;
				continue;
			}
			bookings++;
			order++;
			cursor.set(press.id, end + CHANGEOVER_H * HOUR_MS);
		}
	}

	// A few runs that have ended: booked as of three weeks ago.
	const pastNow = new Date(now.getTime() - 21 * DAY_MS).toISOString();
	let past = 0;
	for (const [i, die] of dies.slice(0, 6).entries()) {
		const press = presses.find((p) => fits(die, p));
		if (!press) continue;
		const start = Date.parse(pastNow.slice(0, 10)) + (2 + i * 2) * DAY_MS + 6 * HOUR_MS;
		const result = await createBooking(
			db,
			{
				die: die.number,
				press: press.name,
				startsAt: new Date(start).toISOString(),
				endsAt: new Date(start + 16 * HOUR_MS).toISOString(),
				parts: partsFor(die, 16, press),
				scrapPct: 3,
				shotsPerHour: defaultShotsPerHour(die.family),
				orderRef: `SO-${3900 + i}`,
				endReason: 'Booked to whole shifts'
			},
			actor,
			{ confirm: true, now: pastNow }
		);
		if (result.ok) past++;
	}

	// Booked while ready, then sent to the toolroom: the planner home shows it as blocked. Written
	// directly because today's checks would (rightly) refuse it.
	const stranded = await db
		.selectFrom('dies')
		.select(['id', 'number'])
		.where('status', '=', 'in_toolroom')
		.where('number', 'not in', [...KEEP_FREE])
		.orderBy('number')
		.executeTakeFirst();
	const facts = stranded
		? await loadDieFacts(db, stranded.number, { customerId: null }, nowIso)
		: null;
	const press = facts ? presses.find((p) => fits(facts, p)) : undefined;
	for (let day = 3; stranded && press && day < HORIZON_DAYS; day++) {
		const startsAt = new Date(firstShift + day * DAY_MS).toISOString();
		const endsAt = new Date(firstShift + day * DAY_MS + 16 * HOUR_MS).toISOString();
		const [onDie, onPress] = await Promise.all([
			findClashes(db, { dieId: stranded.id }, startsAt, endsAt),
			findClashes(db, { machineId: press.id }, startsAt, endsAt)
		]);
		if (onDie.length || onPress.length) continue;
		await db
			.insertInto('press_bookings')
			.values({
				die_id: stranded.id,
				machine_id: press.id,
				starts_at: startsAt,
				ends_at: endsAt,
				order_ref: 'SO-4099',
				parts: partsFor(facts!, 16, press),
				scrap_pct: 3,
				shots_per_hour: defaultShotsPerHour(facts!.family),
				created_by: actor.userId,
				created_at: new Date(now.getTime() - 10 * DAY_MS).toISOString(),
				cancelled_at: null,
				cancelled_by: null,
				cancel_reason: null,
				notes: 'Booked before the die went in for service.'
			})
			.execute();
		bookings++;
		break;
	}
	return { bookings, past, skipped };
}
