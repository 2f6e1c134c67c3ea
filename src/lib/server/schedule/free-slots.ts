/**
 * The next-free-slot finder: for a die and an order (parts, scrap, rate) from an earliest start,
 * the first press slots the order fits into, each judged by `judgeRun` (the one verdict; this
 * module only proposes start times and reads the answers). Sister dies — same part number, not
 * retired — are tried when the asked die has no slot.
 */
import type { UnitSystem } from '../../calc/units';
import type { DB } from '../db/connect';
import type { DieScope } from '../dies/register';
import { nowIso } from '../time';
import { judgeRun, type BookingCheck, type CheckCode, type Verdict } from './verdict';
import { listWindowsOfDie } from './window-clashes';

const DAY_MS = 86_400_000;
const MINUTE_MS = 60_000;

/**
 * Blocks that a later start can clear (the press or die is busy then). Any other block — the
 * die's state, the press down, chamber or clamping force — holds at every start, so the finder
 * stops trying that press.
 */
const TIME_BOUND: readonly CheckCode[] = [
	'die_double_booked',
	'press_double_booked',
	'service_window'
];

export interface SlotRequest {
	die: string;
	parts: number;
	scrapPct: number;
	shotsPerHour: number | null;
	/** ISO UTC; null or in the past means now. */
	earliest: string | null;
}

export interface Slot {
	die: string;
	press: string;
	startsAt: string;
	endsAt: string;
	verdict: Exclude<Verdict, 'blocked'>;
	warnings: BookingCheck[];
	pressHours: number;
	shotsPerHour: number;
}

export interface PressRefusal {
	press: string;
	/** The first reason that holds at every start. */
	message: string;
}

export interface DieSlots {
	die: string;
	part: string;
	status: string;
	slots: Slot[];
	/** Presses that can never take this order, with why. */
	refused: PressRefusal[];
}

export type SlotAnswer =
	| { ok: false; field: 'die'; message: string }
	| {
			ok: true;
			asked: DieSlots;
			/** Sister dies with their own slots; only when the asked die has none. */
			sisters: DieSlots[];
			horizonDays: number;
	  };

export interface SlotOptions {
	now?: string;
	scope?: DieScope;
	unitSystem?: UnitSystem;
	/** How many slots to return per die; default 3. */
	count?: number;
	horizonDays?: number;
}

const ceilMinute = (ms: number) => Math.ceil(ms / MINUTE_MS) * MINUTE_MS;

/**
 * Start times worth trying: the earliest start, then the end of every booking on the press or of
 * the die and of every service window of the die — a slot opens only where something ends.
 */
async function candidateStarts(
	db: DB,
	dieId: number,
	machineId: number,
	earliestMs: number,
	horizonMs: number
): Promise<number[]> {
	const from = new Date(earliestMs).toISOString();
	const to = new Date(horizonMs).toISOString();
	const [bookings, windows] = await Promise.all([
		db
			.selectFrom('press_bookings')
			.select('ends_at')
			.where('cancelled_at', 'is', null)
			.where((eb) => eb.or([eb('die_id', '=', dieId), eb('machine_id', '=', machineId)]))
			.where('ends_at', '>', from)
			.where('ends_at', '<', to)
			.execute(),
		listWindowsOfDie(db, dieId, from, to)
	]);
	const ends = [...bookings.map((b) => b.ends_at), ...windows.map((w) => w.ends_at)].map((e) =>
		Date.parse(e)
	);
	return [...new Set([earliestMs, ...ends.map(ceilMinute)])]
		.filter((ms) => ms >= earliestMs && ms < horizonMs)
		.sort((a, b) => a - b);
}

async function slotsForDie(
	db: DB,
	request: SlotRequest,
	presses: { id: number; name: string }[],
	earliestMs: number,
	options: Required<Pick<SlotOptions, 'now' | 'scope' | 'unitSystem' | 'count' | 'horizonDays'>>
): Promise<DieSlots | null> {
	const horizonMs = earliestMs + options.horizonDays * DAY_MS;
	const judge = (press: string, startMs: number) =>
		judgeRun(
			db,
			{
				die: request.die,
				press,
				startsAt: new Date(startMs).toISOString(),
				parts: request.parts,
				scrapPct: request.scrapPct,
				shotsPerHour: request.shotsPerHour
			},
			{ now: options.now, scope: options.scope, unitSystem: options.unitSystem }
		);
	const first = presses.length ? await judge(presses[0].name, earliestMs) : null;
	if (first && !first.ok) return null;
	const slots: Slot[] = [];
	const refused: PressRefusal[] = [];
	let facts: { id: number; number: string; part: string; status: string } | null = null;
	for (const press of presses) {
		let ev = press === presses[0] && first ? first : await judge(press.name, earliestMs);
		if (!ev.ok) return null;
		facts = { id: ev.die.id, number: ev.die.number, part: ev.die.partName, status: ev.die.status };
		const starts = await candidateStarts(db, ev.die.id, press.id, earliestMs, horizonMs);
		for (const startMs of starts) {
			if (startMs !== earliestMs) {
				ev = await judge(press.name, startMs);
				if (!ev.ok) return null;
			}
			const lasting = ev.blocks.find((b) => !TIME_BOUND.includes(b.code));
			if (lasting) {
				refused.push({ press: press.name, message: lasting.message });
				break;
			}
			if (ev.blocks.length === 0) {
				slots.push({
					die: ev.die.number,
					press: press.name,
					startsAt: ev.startsAt,
					endsAt: ev.endsAt,
					verdict: ev.verdict as Slot['verdict'],
					warnings: ev.warnings,
					pressHours: ev.pressHours,
					shotsPerHour: ev.shotsPerHour
				});
				break;
			}
		}
	}
	if (!facts) return null;
	slots.sort(
		(a, b) =>
			a.startsAt.localeCompare(b.startsAt) ||
			Number(a.verdict === 'warning') - Number(b.verdict === 'warning') ||
			a.press.localeCompare(b.press)
	);
	return {
		die: facts.number,
		part: facts.part,
		status: facts.status,
		slots: slots.slice(0, options.count),
		refused
	};
}

/**
 * The first `count` press slots (default 3) where the order fits from `earliest` on — one per
 * press, the earliest start on each, soonest first — each with its verdict (fits or warning).
 * Sister dies of the same part number (not retired, in the caller's scope) are searched too when
 * the asked die has no slot within the horizon.
 */
export async function findFreeSlots(
	db: DB,
	request: SlotRequest,
	options: SlotOptions = {}
): Promise<SlotAnswer> {
	const now = options.now ?? nowIso();
	const opts = {
		now,
		scope: options.scope ?? { customerId: null },
		unitSystem: options.unitSystem ?? 'metric',
		count: options.count ?? 3,
		horizonDays: options.horizonDays ?? 90
	} as const;
	const nowMs = ceilMinute(Date.parse(now));
	const asked = request.earliest ? ceilMinute(Date.parse(request.earliest)) : nowMs;
	const earliestMs = Math.max(nowMs, asked);
	const presses = await db.selectFrom('machines').select(['id', 'name']).orderBy('name').execute();
	const own = await slotsForDie(db, request, presses, earliestMs, opts);
	if (!own)
		return { ok: false, field: 'die', message: `There is no die ${request.die.toUpperCase()}.` };

	let sisters: DieSlots[] = [];
	if (own.slots.length === 0) {
		const me = await db
			.selectFrom('dies')
			.select(['id', 'part_number'])
			.where('number', '=', own.die)
			.executeTakeFirstOrThrow();
		const part = me.part_number?.trim();
		if (part) {
			const others = await db
				.selectFrom('dies')
				.select('number')
				.where('part_number', '=', part)
				.where('id', '!=', me.id)
				.where('status', '!=', 'retired')
				.$if(opts.scope.customerId !== null, (q) =>
					q.where('customer_id', '=', opts.scope.customerId!)
				)
				.orderBy('number')
				.execute();
			for (const o of others) {
				const found = await slotsForDie(
					db,
					{ ...request, die: o.number },
					presses,
					earliestMs,
					opts
				);
				if (found) sisters.push(found);
			}
			sisters = sisters.filter((s) => s.slots.length > 0 || s.refused.length > 0);
		}
	}
	return { ok: true, asked: own, sisters, horizonDays: opts.horizonDays };
}
