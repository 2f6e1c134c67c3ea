import {
	CLAMP_SAFETY_FACTOR,
	effectiveMetalPressureBar,
	requiredClampForceKn
} from '../../calc/clamp';
import { TYPICAL_SHOTS_PER_HOUR } from '../../calc/life';
import { dayIntervalDueMs } from '../../calc/service';
import { plantZone } from '../../plant-time';
import { checkOrder } from '../../calc/order-check';
import { formatArea, formatForce, formatPressure, type UnitSystem } from '../../calc/units';
import { formatDate, formatDateTime, formatShots } from '../../format';
import { ALLOY_FAMILY_LABELS, CLAMP_CAUTION, jobKindLabel, serviceKindLabel } from '../../labels';
import type { DB } from '../db/connect';
import type { DieScope } from '../dies/register';
import { viewServiceTask } from '../dies/service-summary';
import { nowIso } from '../time';
import {
	loadDieFacts,
	planRate,
	shotsNeededFor,
	type DieFacts,
	type RateSource
} from './die-facts';
import { findPressByName, type Press } from './presses';
import { listOpenToolroomJobs } from './toolroom-hook';
import { findWindowClashes, type WindowClash } from './window-clashes';

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
	| 'too_short'
	| 'service_window';

/**
 * One reason behind a verdict: a block can never be overridden, a warning can be accepted. The
 * message is the sentence shown on every surface; `number` is the figure behind it (shots, kN,
 * days …) or null where there is none.
 */
export interface BookingCheck {
	code: CheckCode;
	level: 'block' | 'warn';
	message: string;
	number: number | null;
}

/** The answer every surface shows: green only when nothing blocks and nothing warns. */
export type Verdict = 'fits' | 'warning' | 'blocked';

/**
 * The question: can die D run N parts (scrap %, rate) on press P from time T (until U)? Without a
 * press the press checks are skipped; without `endsAt` the run ends when its shots are done at the
 * rate; without `startsAt` it starts now.
 */
export interface BookingDraft {
	die: string;
	press?: string | null;
	startsAt?: string | null;
	endsAt?: string | null;
	parts: number;
	scrapPct: number;
	/** Planned rate; null or undefined means the middle of the alloy's usual range. */
	shotsPerHour?: number | null;
}
export type RunRequest = BookingDraft;

/** The question a stored booking asks, for judging it again. */
export function bookingDraft(b: {
	dieNumber: string;
	pressName: string;
	starts_at: string;
	ends_at: string;
	parts: number;
	scrap_pct: number;
	shots_per_hour: number | null;
}): BookingDraft {
	return {
		die: b.dieNumber,
		press: b.pressName,
		startsAt: b.starts_at,
		endsAt: b.ends_at,
		parts: b.parts,
		scrapPct: b.scrap_pct,
		shotsPerHour: b.shots_per_hour
	};
}

export interface ClampFigures {
	requiredKn: number;
	metalPressureBar: number;
	/** True when the die has no pressure of its own and the family default stands in. */
	pressureIsDefault: boolean;
	factor: number;
	availableKn: number | null;
	fits: boolean | null;
	/** The formula with the die's numbers filled in, in the caller's units. */
	formula: string;
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
			verdict: Verdict;
			/** Blocks first, then warnings. */
			reasons: BookingCheck[];
			die: DieFacts;
			press: Press | null;
			startsAt: string;
			endsAt: string;
			shotsPerHour: number;
			/** True when no rate came with the order (die, press or alloy rate stands in). */
			rateIsDefault: boolean;
			rateSource: RateSource;
			shotsNeeded: number;
			/** Press time the shots take at the planned rate, hours. */
			pressHours: number;
			/** The press's die-change and preheat time before the first shot, minutes (0 without a press). */
			dieChangeMinutes: number;
			preheatMinutes: number;
			/** Start + die change + preheat + press hours, to the next whole minute: the worked-out end. */
			workedOutEndsAt: string;
			clamp: ClampFigures;
			/** Shots the die is expected to take between now and the start. */
			shotsBeforeStart: number;
			/** Shots left to the end of the die's expected life when the run starts. */
			lifeLeftAtStart: number;
			blocks: BookingCheck[];
			warnings: BookingCheck[];
	  };

/**
 * Required locking force of a die (Giesserei-Lexikon formula in calc/clamp) at the die's own metal
 * pressure, or the family default where none is recorded.
 */
export function dieClampRequirement(
	die: Pick<DieFacts, 'process' | 'family' | 'projectedAreaCm2' | 'hasSlides' | 'metalPressureBar'>
) {
	const pressureIsDefault = die.metalPressureBar === null;
	const metalPressureBar = effectiveMetalPressureBar(die.metalPressureBar, die.process, die.family);
	const factor = die.hasSlides ? CLAMP_SAFETY_FACTOR.withSlides : CLAMP_SAFETY_FACTOR.withoutSlides;
	return {
		metalPressureBar,
		pressureIsDefault,
		factor,
		requiredKn: requiredClampForceKn({
			projectedAreaCm2: die.projectedAreaCm2,
			metalPressureBar,
			hasSlides: die.hasSlides
		})
	};
}

/**
 * Shots left to the end of the die's expected life. The one place the verdict reads the life
 * figure: swap in the per-half life (life of the most-worn active half) here.
 */
export function shotsLeftToEndOfLife(die: Pick<DieFacts, 'shotsToEndOfLife'>) {
	return die.shotsToEndOfLife;
}

/** The clamping formula with the die's numbers filled in, for the page and the reason sentence. */
export function clampFormula(
	die: Pick<DieFacts, 'projectedAreaCm2' | 'hasSlides'>,
	clamp: Pick<ClampFigures, 'requiredKn' | 'metalPressureBar' | 'factor'>,
	units: UnitSystem
) {
	// cm² × bar ÷ 100 = kN; in² × psi = lbf, so the US form needs no divisor.
	const divide = units === 'metric' ? ' ÷ 100' : '';
	return `${formatArea(die.projectedAreaCm2, units)} × ${formatPressure(clamp.metalPressureBar, units)}${divide} × ${clamp.factor} (${die.hasSlides ? 'with' : 'without'} slides) = ${formatForce(clamp.requiredKn, units)}`;
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

/** An open toolroom job of the die, with the date the toolroom expects to release it, if given. */
export interface JobNote {
	number: string;
	expectedReleaseAt: string | null;
}

function releaseNote(jobs: JobNote[]): { text: string; at: string | null } {
	if (!jobs.length) return { text: '', at: null };
	const dated = jobs
		.map((j) => j.expectedReleaseAt)
		.filter((d): d is string => d !== null)
		.sort();
	// The die comes back when its last job is done; undated jobs leave the date open.
	const last = dated.length === jobs.length ? dated[dated.length - 1] : null;
	const list = `Open toolroom job${jobs.length === 1 ? '' : 's'}: ${jobs.map((j) => j.number).join(', ')}.`;
	return {
		text: last
			? ` ${list} Expected release: ${formatDate(last)}.`
			: ` ${list} No expected release date is recorded.`,
		at: last
	};
}

/**
 * Whether a die in this state cannot be booked: the state-change panel asks this before a move,
 * so what it announces is what the verdict will do.
 */
export function stateBlocksBooking(die: Pick<DieFacts, 'number' | 'status'>): boolean {
	const probe = { ...die, statusReason: null } as DieFacts;
	return statusChecks(probe, [], nowIso()).some((c) => c.level === 'block');
}

function statusChecks(die: DieFacts, jobs: JobNote[], now: string): BookingCheck[] {
	const why = die.statusReason;
	if (die.status === 'retired') {
		return [
			{
				code: 'die_retired',
				level: 'block',
				message: `${die.number} is retired and cannot run again.`,
				number: die.totalShots
			}
		];
	}
	const release = releaseNote(jobs);
	const daysToRelease =
		release.at !== null
			? Math.max(0, Math.ceil((Date.parse(release.at) - Date.parse(now)) / DAY_MS))
			: null;
	if (die.status === 'held') {
		return [
			{
				code: 'die_held',
				level: 'block',
				message: `${die.number} is held${why ? `: ${why}` : ''}. A held die waits for a decision and cannot run until it is released.${release.text}`,
				number: daysToRelease
			}
		];
	}
	if (die.status === 'in_toolroom') {
		return [
			{
				code: 'die_in_toolroom',
				level: 'block',
				message: `${die.number} is in the toolroom${why ? ` (${why})` : ''}. It cannot run until its job is closed and the toolroom releases it.${release.text}`,
				number: daysToRelease
			}
		];
	}
	return [];
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
			message: `${die.number} is built for ${dieChamber}-chamber casting; ${press.name} is a ${pressKind} press.`,
			number: null
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
			message: `${ALLOY_FAMILY_LABELS[die.family]} (${die.alloyCode}) is cast on cold-chamber presses only: ${why}. ${press.name} is hot chamber.`,
			number: null
		});
	}
	if (press.chamber === 'cold' && die.family === 'zinc') {
		checks.push({
			code: 'chamber_alloy',
			level: 'warn',
			message: `Zinc (${die.alloyCode}) usually runs on hot-chamber presses; ${press.name} is cold chamber. Only high-aluminium zinc alloys and very large zinc parts are cast that way.`,
			number: null
		});
	}
	return checks;
}

type TaskFacts = DieFacts['tasks'][number];
interface TaskStanding {
	totalShots: number;
	now: string;
	zone: string;
	view: ReturnType<typeof viewServiceTask>;
	dayDueMs: number | null;
}
// Where a task stands does not depend on the run being judged: the board judges every booking of
// a die against the same task objects, so the standing is worked out once per task and instant.
const standings = new WeakMap<TaskFacts, TaskStanding>();

function taskStanding(task: TaskFacts, totalShots: number, now: string): TaskStanding {
	const zone = plantZone();
	const known = standings.get(task);
	if (known && known.totalShots === totalShots && known.now === now && known.zone === zone)
		return known;
	const standing: TaskStanding = {
		totalShots,
		now,
		zone,
		view: viewServiceTask(task, totalShots, now),
		dayDueMs:
			task.interval_days !== null
				? dayIntervalDueMs(task.last_done_at, task.interval_days, zone)
				: null
	};
	standings.set(task, standing);
	return standing;
}

function serviceChecks(
	die: DieFacts,
	now: string,
	startMs: number,
	/** When the first shot is made: after the die change and preheat. */
	firstShotMs: number,
	endMs: number,
	shotsBeforeStart: number,
	shotsNeeded: number,
	shotsPerHour: number
): BookingCheck[] {
	const checks: BookingCheck[] = [];
	for (const task of die.tasks) {
		const { view, dayDueMs } = taskStanding(task, die.totalShots, now);
		const label = serviceKindLabel(task.kind);
		let dueBeforeStart: { text: string; number: number } | null = null;
		let dueDuringMs: number | null = null;
		let dueDuring: { note: string; number: number } | null = null;
		if (task.interval_shots !== null && view.shotsRemaining !== null) {
			const leftAtStart = view.shotsRemaining - shotsBeforeStart;
			if (leftAtStart <= 0) {
				dueBeforeStart = {
					text: `its ${formatShots(task.interval_shots)}-shot interval is used up`,
					number: leftAtStart
				};
			} else if (leftAtStart < shotsNeeded) {
				dueDuringMs = firstShotMs + (leftAtStart / shotsPerHour) * HOUR_MS;
				dueDuring = {
					note: `, after about ${formatShots(leftAtStart)} of the run's ${formatShots(shotsNeeded)} shots`,
					number: leftAtStart
				};
			}
		}
		if (task.interval_days !== null && dueBeforeStart === null) {
			const dueMs = dayDueMs!;
			// Whole days from the start of the run to the due instant; negative when overdue.
			const daysLeft = Math.floor((dueMs - startMs) / DAY_MS);
			if (dueMs <= startMs) {
				dueBeforeStart = {
					text: `its ${task.interval_days}-day interval ended ${formatDateTime(new Date(dueMs).toISOString())}`,
					number: daysLeft
				};
			} else if (dueMs < endMs && (dueDuringMs === null || dueMs < dueDuringMs)) {
				dueDuringMs = dueMs;
				dueDuring = { note: ` (${task.interval_days}-day interval)`, number: daysLeft };
			}
		}
		if (dueBeforeStart !== null) {
			checks.push({
				code: 'service_due',
				level: 'warn',
				message: `${label} is due before this run starts: ${dueBeforeStart.text}. Plan it first, or run anyway.`,
				number: dueBeforeStart.number
			});
		} else if (dueDuringMs !== null && dueDuring !== null) {
			checks.push({
				code: 'service_due',
				level: 'warn',
				message: `${label} comes due during this run, around ${formatDateTime(new Date(dueDuringMs).toISOString())}${dueDuring.note}.`,
				number: dueDuring.number
			});
		}
	}
	return checks;
}

export interface AssessInput {
	draft: BookingDraft;
	die: DieFacts;
	press: Press | null;
	/** The die's open toolroom jobs. */
	jobs: JobNote[];
	dieClashes: Clash[];
	pressClashes: Clash[];
	/** The die's service windows (not cancelled) overlapping the run. */
	windowClashes: WindowClash[];
	shotsBeforeStart: number;
	now: string;
	scope: DieScope;
	units: UnitSystem;
}

export type Assessment = Extract<Evaluation, { ok: true }>;

/** Die-change and preheat minutes of a press before a run's first shot; none without a press. */
export function changeoverOf(press: Pick<Press, 'die_change_minutes' | 'preheat_minutes'> | null) {
	return {
		dieChangeMinutes: press?.die_change_minutes ?? 0,
		preheatMinutes: press?.preheat_minutes ?? 0
	};
}

/**
 * The run's window: from the start (now when not given) to the end — when given, as booked;
 * otherwise worked out: the press's die change and preheat, then the shots at the rate (press
 * hours from calc/order-check), rounded up to the whole minute so that a booking made for exactly
 * this window (booking times are kept to the minute) is judged the same. `workedOutEndsAt` is
 * that worked-out end even when an end was given.
 */
export function runWindow(
	draft: BookingDraft,
	pressHours: number,
	changeoverMinutes: number,
	now: string
) {
	const startsAt = draft.startsAt ?? now;
	const MINUTE_MS = 60_000;
	const workedOutEndsAt = new Date(
		Math.ceil(
			(Date.parse(startsAt) + changeoverMinutes * MINUTE_MS + Math.ceil(pressHours * HOUR_MS)) /
				MINUTE_MS
		) * MINUTE_MS
	).toISOString();
	return { startsAt, endsAt: draft.endsAt ?? workedOutEndsAt, workedOutEndsAt };
}

/** Press hours of a run: the order check's arithmetic (calc/order-check), nothing else. */
function runPressHours(parts: number, cavities: number, scrapPct: number, shotsPerHour: number) {
	return checkOrder({
		parts,
		cavities,
		scrapPct,
		shotsPerHour,
		shotsToNextService: null,
		shotsToEndOfLife: null
	}).pressHours;
}

/**
 * THE verdict, from facts already loaded: the one place Castellan judges whether a die can run an
 * order. Blocking: die retired, held or in the toolroom; die or press already booked; a service
 * window of the die overlaps the run; press down;
 * clamping force too small at the die's own metal pressure; die or alloy on the wrong chamber
 * type. Warnings: a service task (by shots or by days) comes due before the run ends, the order
 * outruns the die's remaining life, an unusual rate, or a booked window too short for the shots.
 * Verdict: blocked when anything blocks, warning when anything warns, fits otherwise.
 */
export function assessRun(input: AssessInput): Assessment {
	const { draft, die, press, now, scope, units, shotsBeforeStart } = input;
	const rateIsDefault = draft.shotsPerHour == null;
	const rate = planRate(draft.shotsPerHour, die, press);
	const shotsPerHour = rate.shotsPerHour;
	const shotsNeeded = shotsNeededFor(draft.parts, die.cavities, draft.scrapPct);
	const { dieChangeMinutes, preheatMinutes } = changeoverOf(press);
	const changeoverMs = (dieChangeMinutes + preheatMinutes) * 60_000;
	const { startsAt, endsAt, workedOutEndsAt } = runWindow(
		draft,
		runPressHours(draft.parts, die.cavities, draft.scrapPct, shotsPerHour),
		dieChangeMinutes + preheatMinutes,
		now
	);
	const startMs = Date.parse(startsAt);
	const endMs = Date.parse(endsAt);
	const req = dieClampRequirement(die);
	const clamp: ClampFigures = {
		requiredKn: req.requiredKn,
		metalPressureBar: req.metalPressureBar,
		pressureIsDefault: req.pressureIsDefault,
		factor: req.factor,
		availableKn: press?.clamp_force_kn ?? null,
		fits: press ? press.clamp_force_kn >= req.requiredKn : null,
		formula: clampFormula(die, req, units)
	};

	const checks: BookingCheck[] = [...statusChecks(die, input.jobs, now)];
	for (const c of input.dieClashes) {
		checks.push({
			code: 'die_double_booked',
			level: 'block',
			message: `${die.number} is already booked on ${c.pressName} ${span(c)} (order ${c.order_ref}).`,
			number: c.id
		});
	}
	for (const w of input.windowClashes) {
		checks.push({
			code: 'service_window',
			level: 'block',
			message: `${die.number} is reserved for the toolroom (${jobKindLabel(w.kind).toLowerCase()}) ${span(w)}${w.note ? `: ${w.note}` : ''}. Book around the service window, or move or cancel it first.`,
			number: w.id
		});
	}
	if (press) {
		for (const c of input.pressClashes) {
			// Another owner's die and order stay private from a customer-bound caller.
			const visible = scope.customerId === null || scope.customerId === c.dieCustomerId;
			checks.push({
				code: 'press_double_booked',
				level: 'block',
				message: visible
					? `${press.name} is already booked for ${c.dieNumber} ${span(c)} (order ${c.order_ref}).`
					: `${press.name} is already booked ${span(c)}.`,
				number: visible ? c.id : null
			});
		}
		if (press.status === 'down') {
			checks.push({
				code: 'press_down',
				level: 'block',
				message: `${press.name} is down for maintenance${press.notes ? ` (${press.notes})` : ''}.`,
				number: null
			});
		}
		checks.push(...chamberChecks(die, press));
		if (!clamp.fits) {
			checks.push({
				code: 'clamp_force',
				level: 'block',
				message: `${press.name} clamps ${formatForce(press.clamp_force_kn, units)}; ${die.number} needs at least ${formatForce(clamp.requiredKn, units)} (${clamp.formula})${clamp.pressureIsDefault ? ' (family default pressure; record the die’s own)' : ''}. Choose a larger press. ${CLAMP_CAUTION}`,
				number: Math.round(clamp.requiredKn)
			});
		}
	}

	checks.push(
		...serviceChecks(
			die,
			now,
			startMs,
			startMs + changeoverMs,
			endMs,
			shotsBeforeStart,
			shotsNeeded,
			shotsPerHour
		)
	);
	const lifeLeftAtStart = shotsLeftToEndOfLife(die) - shotsBeforeStart;
	const order = checkOrder({
		parts: draft.parts,
		cavities: die.cavities,
		scrapPct: draft.scrapPct,
		shotsPerHour,
		shotsToNextService: null,
		shotsToEndOfLife: lifeLeftAtStart
	});
	if (die.status !== 'retired' && order.blockedBy === 'end_of_life') {
		checks.push({
			code: 'end_of_life',
			level: 'warn',
			message:
				lifeLeftAtStart <= 0
					? `${die.number} will be at or past the end of its expected life (${formatShots(die.expectedLifeShots)} shots) before this run starts.`
					: `The order needs ${formatShots(shotsNeeded)} shots; ${die.number} has about ${formatShots(lifeLeftAtStart)} left before the end of its expected life (${formatShots(die.expectedLifeShots)} shots).`,
			number: lifeLeftAtStart
		});
	}
	const range = TYPICAL_SHOTS_PER_HOUR[die.family];
	if (shotsPerHour < range.min || shotsPerHour > range.max) {
		checks.push({
			code: 'rate_unusual',
			level: 'warn',
			message: `${formatShots(shotsPerHour)} shots per hour is outside the usual ${range.min}–${range.max} for ${ALLOY_FAMILY_LABELS[die.family].toLowerCase()} (NADCA). Check the planned rate.`,
			number: shotsPerHour
		});
	}
	if (draft.endsAt) {
		const bookedHours = (endMs - startMs) / HOUR_MS;
		// The die change and preheat take their time out of the booked window before any shot.
		const castingHours = Math.max(0, (endMs - startMs - changeoverMs) / HOUR_MS);
		const capacity = Math.floor(castingHours * shotsPerHour);
		if (capacity < shotsNeeded) {
			const less =
				changeoverMs > 0
					? ` less ${dieChangeMinutes + preheatMinutes} min die change and preheat`
					: '';
			checks.push({
				code: 'too_short',
				level: 'warn',
				message: `The booked ${Number(bookedHours.toFixed(1))} h${less} at ${formatShots(shotsPerHour)} shots per hour give about ${formatShots(capacity)} shots; the order needs ${formatShots(shotsNeeded)}. Book more time or plan a faster rate.`,
				number: capacity
			});
		}
	}

	const blocks = checks.filter((c) => c.level === 'block');
	const warnings = checks.filter((c) => c.level === 'warn');
	return {
		ok: true,
		verdict: blocks.length ? 'blocked' : warnings.length ? 'warning' : 'fits',
		reasons: [...blocks, ...warnings],
		die,
		press,
		startsAt,
		endsAt,
		shotsPerHour,
		rateIsDefault,
		rateSource: rate.source,
		shotsNeeded,
		pressHours: order.pressHours,
		dieChangeMinutes,
		preheatMinutes,
		workedOutEndsAt,
		clamp,
		shotsBeforeStart,
		lifeLeftAtStart,
		blocks,
		warnings
	};
}

/**
 * THE verdict: loads what the judgement needs for one run and calls `assessRun`. The order-check
 * page, its API, the booking form, the booking API and one booking's page all call this.
 */
export async function judgeRun(
	db: DB,
	draft: BookingDraft,
	options: CheckOptions = {}
): Promise<Evaluation> {
	const now = options.now ?? nowIso();
	const scope = options.scope ?? { customerId: null };
	const [die, press] = await Promise.all([
		loadDieFacts(db, draft.die, scope, now),
		draft.press ? findPressByName(db, draft.press) : Promise.resolve(null)
	]);
	if (!die)
		return { ok: false, field: 'die', message: `There is no die ${draft.die.toUpperCase()}.` };
	if (draft.press && !press)
		return { ok: false, field: 'press', message: `There is no press ${draft.press}.` };
	const { shotsPerHour } = planRate(draft.shotsPerHour, die, press ?? null);
	const changeover = changeoverOf(press ?? null);
	const { startsAt, endsAt } = runWindow(
		draft,
		runPressHours(draft.parts, die.cavities, draft.scrapPct, shotsPerHour),
		changeover.dieChangeMinutes + changeover.preheatMinutes,
		now
	);
	const startMs = Date.parse(startsAt);
	const nowMs = Date.parse(now);
	const stopped = die.status === 'in_toolroom' || die.status === 'held';
	const [jobs, dieClashes, pressClashes, runs, windowClashes] = await Promise.all([
		stopped ? listOpenToolroomJobs(db, [die.id]) : Promise.resolve([]),
		findClashes(db, { dieId: die.id }, startsAt, endsAt, options.excludeBookingId),
		press
			? findClashes(db, { machineId: press.id }, startsAt, endsAt, options.excludeBookingId)
			: Promise.resolve([]),
		listRunsBetween(db, die.id, nowMs, startMs, options.excludeBookingId),
		findWindowClashes(db, [die.id], startsAt, endsAt)
	]);
	return assessRun({
		draft,
		die,
		press: press ?? null,
		jobs: jobs.map((j) => ({ number: j.number, expectedReleaseAt: j.expectedReleaseAt })),
		dieClashes,
		pressClashes,
		windowClashes,
		shotsBeforeStart: projectShotsBeforeStart(die, startMs, nowMs, runs),
		now,
		scope,
		units: options.unitSystem ?? 'metric'
	});
}
