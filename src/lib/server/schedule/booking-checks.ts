import {
	CLAMP_SAFETY_FACTOR,
	defaultMetalPressureBar,
	requiredClampForceKn
} from '../../calc/clamp';
import { TYPICAL_SHOTS_PER_HOUR } from '../../calc/life';
import { checkOrder } from '../../calc/order-check';
import { formatArea, formatForce, formatPressure, type UnitSystem } from '../../calc/units';
import { formatDateTime, formatShots } from '../../format';
import { ALLOY_FAMILY_LABELS, serviceKindLabel } from '../../labels';
import type { DB } from '../db/connect';
import type { DieScope } from '../dies/register';
import { viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';
import { defaultShotsPerHour, loadDieFacts, shotsNeededFor, type DieFacts } from './die-facts';
import { findPressByName, type Press } from './presses';
import { listOpenToolroomJobs } from './toolroom-hook';

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

export type CheckCode =
	| 'die_retired'
	| 'die_held'
	| 'die_in_toolroom'
	| 'die_double_booked'
	| 'press_double_booked'
	| 'press_down'
	| 'clamp_force'
	| 'chamber_process'
	| 'chamber_alloy'
	| 'service_due'
	| 'end_of_life'
	| 'rate_unusual'
	| 'too_short';

/** One finding about a booking: a block can never be overridden, a warning can be accepted. */
export interface BookingCheck {
	code: CheckCode;
	level: 'block' | 'warn';
	message: string;
}

export interface BookingDraft {
	die: string;
	press: string;
	startsAt: string;
	endsAt: string;
	parts: number;
	scrapPct: number;
	/** Planned rate; null or undefined means the middle of the alloy's usual range. */
	shotsPerHour?: number | null;
}

export interface CheckOptions {
	now?: string;
	scope?: DieScope;
	/** The booking being re-checked, so it does not clash with itself. */
	excludeBookingId?: number;
	unitSystem?: UnitSystem;
}

export type Evaluation =
	| { ok: false; field: 'die' | 'press'; message: string }
	| {
			ok: true;
			die: DieFacts;
			press: Press;
			shotsPerHour: number;
			shotsNeeded: number;
			/** Press time the shots take at the planned rate, hours. */
			pressHours: number;
			requiredClampKn: number;
			metalPressureBar: number;
			/** Shots the die is expected to take between now and the start. */
			shotsBeforeStart: number;
			blocks: BookingCheck[];
			warnings: BookingCheck[];
	  };

/** Required locking force of a die (Giesserei-Lexikon formula in calc/clamp) at the default pressure. */
export function dieClampRequirement(
	die: Pick<DieFacts, 'process' | 'family' | 'projectedAreaCm2' | 'hasSlides'>
) {
	const metalPressureBar = defaultMetalPressureBar(die.process, die.family);
	return {
		metalPressureBar,
		requiredKn: requiredClampForceKn({
			projectedAreaCm2: die.projectedAreaCm2,
			metalPressureBar,
			hasSlides: die.hasSlides
		})
	};
}

export interface Clash {
	id: number;
	starts_at: string;
	ends_at: string;
	order_ref: string;
	dieNumber: string;
	dieCustomerId: number;
	pressName: string;
}

/** Non-cancelled bookings of a die or a press overlapping [start, end); touching ends do not overlap. */
export async function findClashes(
	db: DB,
	by: { dieId: number } | { machineId: number },
	startsAt: string,
	endsAt: string,
	excludeId?: number
): Promise<Clash[]> {
	return db
		.selectFrom('press_bookings as b')
		.innerJoin('dies', 'dies.id', 'b.die_id')
		.innerJoin('machines', 'machines.id', 'b.machine_id')
		.select([
			'b.id',
			'b.starts_at',
			'b.ends_at',
			'b.order_ref',
			'dies.number as dieNumber',
			'dies.customer_id as dieCustomerId',
			'machines.name as pressName'
		])
		.$if('dieId' in by, (q) => q.where('b.die_id', '=', (by as { dieId: number }).dieId))
		.$if('machineId' in by, (q) =>
			q.where('b.machine_id', '=', (by as { machineId: number }).machineId)
		)
		.where('b.cancelled_at', 'is', null)
		.where('b.starts_at', '<', endsAt)
		.where('b.ends_at', '>', startsAt)
		.$if(excludeId !== undefined, (q) => q.where('b.id', '!=', excludeId!))
		.orderBy('b.starts_at')
		.limit(5)
		.execute();
}

const span = (c: { starts_at: string; ends_at: string }) =>
	`from ${formatDateTime(c.starts_at)} to ${formatDateTime(c.ends_at)}`;

export interface PlannedRun {
	starts_at: string;
	ends_at: string;
	parts: number;
	scrap_pct: number;
}

/**
 * Shots the die takes between now and the booking's start: the trailing rate over that time or
 * the planned shots of its bookings in between, whichever is larger (a die booked solid runs at
 * its bookings' rate; an unbooked die keeps its recent pace). `runs` are the die's other
 * bookings; only the part of each between now and the start counts.
 */
export function projectShotsBeforeStart(
	die: DieFacts,
	startMs: number,
	nowMs: number,
	runs: readonly PlannedRun[]
) {
	if (startMs <= nowMs) return 0;
	const trailing = (die.shotsPerDay * (startMs - nowMs)) / DAY_MS;
	let booked = 0;
	for (const b of runs) {
		const s = Date.parse(b.starts_at);
		const e = Date.parse(b.ends_at);
		const inside = Math.max(0, Math.min(e, startMs) - Math.max(s, nowMs));
		if (inside > 0)
			booked += (shotsNeededFor(b.parts, die.cavities, b.scrap_pct) * inside) / (e - s);
	}
	return Math.round(Math.max(trailing, booked));
}

async function listRunsBetween(
	db: DB,
	dieId: number,
	nowMs: number,
	startMs: number,
	excludeId?: number
) {
	if (startMs <= nowMs) return [];
	return db
		.selectFrom('press_bookings')
		.select(['starts_at', 'ends_at', 'parts', 'scrap_pct'])
		.where('die_id', '=', dieId)
		.where('cancelled_at', 'is', null)
		.where('ends_at', '>', new Date(nowMs).toISOString())
		.where('starts_at', '<', new Date(startMs).toISOString())
		.$if(excludeId !== undefined, (q) => q.where('id', '!=', excludeId!))
		.execute();
}

function statusChecks(die: DieFacts, jobNumbers: string[]): BookingCheck[] {
	const why = die.statusReason;
	if (die.status === 'retired') {
		return [
			{
				code: 'die_retired',
				level: 'block',
				message: `${die.number} is retired and cannot be booked.`
			}
		];
	}
	if (die.status === 'held') {
		return [
			{
				code: 'die_held',
				level: 'block',
				message: `${die.number} is held${why ? `: ${why}` : ''}. A held die waits for a decision and cannot be booked.`
			}
		];
	}
	if (die.status === 'in_toolroom') {
		const jobs = jobNumbers.length ? ` Open toolroom job: ${jobNumbers.join(', ')}.` : '';
		return [
			{
				code: 'die_in_toolroom',
				level: 'block',
				message: `${die.number} is in the toolroom${why ? ` (${why})` : ''}.${jobs} It cannot be booked until the toolroom releases it.`
			}
		];
	}
	return [];
}

/**
 * Whether a die in this state cannot be booked: the state-change panel asks this before a move,
 * so what it announces is what the booking checks above will do.
 */
export function stateBlocksBooking(die: Pick<DieFacts, 'number' | 'status'>): boolean {
	const probe = { ...die, statusReason: null } as DieFacts;
	return statusChecks(probe, []).some((c) => c.level === 'block');
}

/**
 * Chamber rules (die-casting practice): aluminium and copper alloys are cast on cold-chamber
 * presses only — molten aluminium attacks the iron pot and gooseneck of a hot-chamber machine and
 * copper alloys melt too hot for them — so either on a hot-chamber press is blocked. Zinc belongs
 * on hot chamber; zinc on a cold-chamber press is only a warning, since high-aluminium zinc alloys
 * and very large zinc parts are cast that way. Magnesium runs either way (small parts hot chamber,
 * large parts cold chamber), so it raises nothing. Separately, a die is built for one process
 * (gooseneck nozzle or shot sleeve), so a die on a press of the other chamber type is blocked.
 */
export function chamberChecks(die: DieFacts, press: Press): BookingCheck[] {
	const checks: BookingCheck[] = [];
	const pressKind = press.chamber === 'hot' ? 'hot-chamber' : 'cold-chamber';
	const dieChamber = die.process === 'hot_chamber' ? 'hot' : 'cold';
	if (dieChamber !== press.chamber) {
		checks.push({
			code: 'chamber_process',
			level: 'block',
			message: `${die.number} is built for ${dieChamber}-chamber casting; ${press.name} is a ${pressKind} press.`
		});
	}
	if (press.chamber === 'hot' && (die.family === 'aluminium' || die.family === 'copper')) {
		const why =
			die.family === 'aluminium'
				? 'molten aluminium attacks the iron pot and gooseneck of a hot-chamber press'
				: 'copper alloys melt too hot for the pot and gooseneck of a hot-chamber press';
		checks.push({
			code: 'chamber_alloy',
			level: 'block',
			message: `${ALLOY_FAMILY_LABELS[die.family]} (${die.alloyCode}) is cast on cold-chamber presses only: ${why}. ${press.name} is hot chamber.`
		});
	}
	if (press.chamber === 'cold' && die.family === 'zinc') {
		checks.push({
			code: 'chamber_alloy',
			level: 'warn',
			message: `Zinc (${die.alloyCode}) usually runs on hot-chamber presses; ${press.name} is cold chamber. Only high-aluminium zinc alloys and very large zinc parts are cast that way.`
		});
	}
	return checks;
}

function serviceChecks(
	die: DieFacts,
	now: string,
	startMs: number,
	endMs: number,
	shotsBeforeStart: number,
	shotsNeeded: number,
	shotsPerHour: number
): BookingCheck[] {
	const checks: BookingCheck[] = [];
	for (const task of die.tasks) {
		const view = viewServiceTask(task, die.totalShots, now);
		const label = serviceKindLabel(task.kind);
		let dueBeforeStart: string | null = null;
		let dueDuringMs: number | null = null;
		let dueDuringNote = '';
		if (task.interval_shots !== null && view.shotsRemaining !== null) {
			const leftAtStart = view.shotsRemaining - shotsBeforeStart;
			if (leftAtStart <= 0) {
				dueBeforeStart = `its ${formatShots(task.interval_shots)}-shot interval is used up`;
			} else if (leftAtStart < shotsNeeded) {
				dueDuringMs = startMs + (leftAtStart / shotsPerHour) * HOUR_MS;
				dueDuringNote = `, after about ${formatShots(leftAtStart)} of the run's ${formatShots(shotsNeeded)} shots`;
			}
		}
		if (task.interval_days !== null && dueBeforeStart === null) {
			const dueMs = Date.parse(task.last_done_at) + task.interval_days * DAY_MS;
			if (dueMs <= startMs) {
				dueBeforeStart = `its ${task.interval_days}-day interval ended ${formatDateTime(new Date(dueMs).toISOString())}`;
			} else if (dueMs < endMs && (dueDuringMs === null || dueMs < dueDuringMs)) {
				dueDuringMs = dueMs;
				dueDuringNote = ` (${task.interval_days}-day interval)`;
			}
		}
		if (dueBeforeStart !== null) {
			checks.push({
				code: 'service_due',
				level: 'warn',
				message: `${label} is due before this run starts: ${dueBeforeStart}. Plan it first, or book anyway.`
			});
		} else if (dueDuringMs !== null) {
			checks.push({
				code: 'service_due',
				level: 'warn',
				message: `${label} comes due during this run, around ${formatDateTime(new Date(dueDuringMs).toISOString())}${dueDuringNote}.`
			});
		}
	}
	return checks;
}

export interface AssessInput {
	draft: BookingDraft;
	die: DieFacts;
	press: Press;
	/** Numbers of the die's open toolroom jobs. */
	jobNumbers: string[];
	dieClashes: Clash[];
	pressClashes: Clash[];
	shotsBeforeStart: number;
	now: string;
	scope: DieScope;
	units: UnitSystem;
}

export type Assessment = Extract<Evaluation, { ok: true }>;

/**
 * Every check of a booking, each with a plain message, from facts already loaded. Blocking: die
 * retired, held or in the toolroom; die or press already booked; press down; clamping force too
 * small; die or alloy on the wrong chamber type. Warnings: a service task comes due, the order
 * outruns the die's remaining life, an unusual rate, or a window too short for the shots.
 */
export function assessBooking(input: AssessInput): Assessment {
	const { draft, die, press, now, scope, units, shotsBeforeStart } = input;
	const startMs = Date.parse(draft.startsAt);
	const endMs = Date.parse(draft.endsAt);
	const shotsPerHour = draft.shotsPerHour ?? defaultShotsPerHour(die.family);
	const shotsNeeded = shotsNeededFor(draft.parts, die.cavities, draft.scrapPct);
	const { requiredKn, metalPressureBar } = dieClampRequirement(die);

	const checks: BookingCheck[] = [...statusChecks(die, input.jobNumbers)];
	for (const c of input.dieClashes) {
		checks.push({
			code: 'die_double_booked',
			level: 'block',
			message: `${die.number} is already booked on ${c.pressName} ${span(c)} (order ${c.order_ref}).`
		});
	}
	for (const c of input.pressClashes) {
		// Another owner's die and order stay private from a customer-bound caller.
		const visible = scope.customerId === null || scope.customerId === c.dieCustomerId;
		checks.push({
			code: 'press_double_booked',
			level: 'block',
			message: visible
				? `${press.name} is already booked for ${c.dieNumber} ${span(c)} (order ${c.order_ref}).`
				: `${press.name} is already booked ${span(c)}.`
		});
	}
	if (press.status === 'down') {
		checks.push({
			code: 'press_down',
			level: 'block',
			message: `${press.name} is down for maintenance${press.notes ? ` (${press.notes})` : ''}.`
		});
	}
	checks.push(...chamberChecks(die, press));
	if (press.clamp_force_kn < requiredKn) {
		const factor = die.hasSlides
			? CLAMP_SAFETY_FACTOR.withSlides
			: CLAMP_SAFETY_FACTOR.withoutSlides;
		checks.push({
			code: 'clamp_force',
			level: 'block',
			message: `${press.name} clamps ${formatForce(press.clamp_force_kn, units)}; ${die.number} needs at least ${formatForce(requiredKn, units)} (${formatArea(die.projectedAreaCm2, units)} at ${formatPressure(metalPressureBar, units)}, × ${factor} ${die.hasSlides ? 'with' : 'without'} slides). Choose a larger press.`
		});
	}

	checks.push(
		...serviceChecks(die, now, startMs, endMs, shotsBeforeStart, shotsNeeded, shotsPerHour)
	);
	const lifeLeft = die.expectedLifeShots - die.totalShots - shotsBeforeStart;
	const order = checkOrder({
		parts: draft.parts,
		cavities: die.cavities,
		scrapPct: draft.scrapPct,
		shotsPerHour,
		shotsToNextService: null,
		shotsToEndOfLife: lifeLeft
	});
	if (order.blockedBy === 'end_of_life') {
		checks.push({
			code: 'end_of_life',
			level: 'warn',
			message:
				lifeLeft <= 0
					? `${die.number} will be at or past the end of its expected life (${formatShots(die.expectedLifeShots)} shots) before this run starts.`
					: `The order needs ${formatShots(shotsNeeded)} shots; ${die.number} has about ${formatShots(lifeLeft)} left before the end of its expected life (${formatShots(die.expectedLifeShots)} shots).`
		});
	}
	const range = TYPICAL_SHOTS_PER_HOUR[die.family];
	if (shotsPerHour < range.min || shotsPerHour > range.max) {
		checks.push({
			code: 'rate_unusual',
			level: 'warn',
			message: `${formatShots(shotsPerHour)} shots per hour is outside the usual ${range.min}–${range.max} for ${ALLOY_FAMILY_LABELS[die.family].toLowerCase()} (NADCA). Check the planned rate.`
		});
	}
	const bookedHours = (endMs - startMs) / HOUR_MS;
	const capacity = Math.floor(bookedHours * shotsPerHour);
	if (capacity < shotsNeeded) {
		checks.push({
			code: 'too_short',
			level: 'warn',
			message: `The booked ${Number(bookedHours.toFixed(1))} h at ${formatShots(shotsPerHour)} shots per hour give about ${formatShots(capacity)} shots; the order needs ${formatShots(shotsNeeded)}. Book more time or plan a faster rate.`
		});
	}

	return {
		ok: true,
		die,
		press,
		shotsPerHour,
		shotsNeeded,
		pressHours: order.pressHours,
		requiredClampKn: requiredKn,
		metalPressureBar,
		shotsBeforeStart,
		blocks: checks.filter((c) => c.level === 'block'),
		warnings: checks.filter((c) => c.level === 'warn')
	};
}

/** Loads what the checks need for one booking and runs them (the form, the API, one booking page). */
export async function evaluateBooking(
	db: DB,
	draft: BookingDraft,
	options: CheckOptions = {}
): Promise<Evaluation> {
	const now = options.now ?? nowIso();
	const scope = options.scope ?? { customerId: null };
	const [die, press] = await Promise.all([
		loadDieFacts(db, draft.die, scope, now),
		findPressByName(db, draft.press)
	]);
	if (!die)
		return { ok: false, field: 'die', message: `There is no die ${draft.die.toUpperCase()}.` };
	if (!press) return { ok: false, field: 'press', message: `There is no press ${draft.press}.` };
	const startMs = Date.parse(draft.startsAt);
	const nowMs = Date.parse(now);
	const [jobs, dieClashes, pressClashes, runs] = await Promise.all([
		die.status === 'in_toolroom' ? listOpenToolroomJobs(db, [die.id]) : Promise.resolve([]),
		findClashes(db, { dieId: die.id }, draft.startsAt, draft.endsAt, options.excludeBookingId),
		findClashes(
			db,
			{ machineId: press.id },
			draft.startsAt,
			draft.endsAt,
			options.excludeBookingId
		),
		listRunsBetween(db, die.id, nowMs, startMs, options.excludeBookingId)
	]);
	return assessBooking({
		draft,
		die,
		press,
		jobNumbers: jobs.map((j) => j.number),
		dieClashes,
		pressClashes,
		shotsBeforeStart: projectShotsBeforeStart(die, startMs, nowMs, runs),
		now,
		scope,
		units: options.unitSystem ?? 'metric'
	});
}
