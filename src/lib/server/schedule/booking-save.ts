import type { UnitSystem } from '../../calc/units';
import { formatDateTime } from '../../format';
import { MAX_BOOKING_DAYS } from '../../schemas/schedule';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';
import type { RateSource } from './die-facts';
import {
	judgeRun,
	type BookingCheck,
	type BookingDraft,
	type Evaluation,
	type Verdict
} from './verdict';

const DAY_MS = 86_400_000;

export interface BookingActor {
	userId: string | null;
	tokenId: number | null;
	/** A customer-bound caller books only its own dies. */
	customerId: number | null;
}

/**
 * A booking as the form and the API send it. Without `endsAt` the end is worked out (die change +
 * preheat + press hours); an `endsAt` other than the worked-out end needs `endReason`.
 */
export interface NewBookingInput extends BookingDraft {
	press: string;
	startsAt: string;
	endsAt?: string | null;
	endReason?: string | null;
	orderRef: string;
	notes?: string | null;
}

/** The run as worked out for the planner to read before saving ("shown back as read"). */
export interface BookingPlan {
	die: string;
	press: string;
	cavities: number;
	parts: number;
	scrapPct: number;
	shotsNeeded: number;
	shotsPerHour: number;
	rateSource: RateSource;
	pressHours: number;
	dieChangeMinutes: number;
	preheatMinutes: number;
	startsAt: string;
	endsAt: string;
	workedOutEndsAt: string;
	/** True when the planner set an end other than the worked-out one. */
	endOverridden: boolean;
	verdict: Verdict;
	blocks: BookingCheck[];
	warnings: BookingCheck[];
}

export type BookingField = 'die' | 'press' | 'endsAt' | 'endReason';

export type SaveBookingResult =
	| { ok: true; id: number; warnings: BookingCheck[]; plan: BookingPlan; changed: string[] }
	| { ok: false; kind: 'invalid'; field: BookingField; message: string }
	| { ok: false; kind: 'gone'; status: 404 | 409; message: string }
	| { ok: false; kind: 'review'; plan: BookingPlan }
	| {
			ok: false;
			kind: 'blocked';
			blocks: BookingCheck[];
			warnings: BookingCheck[];
			plan: BookingPlan;
	  }
	| { ok: false; kind: 'confirm'; warnings: BookingCheck[]; plan: BookingPlan };
export type CreateBookingResult = SaveBookingResult;

export interface SaveOptions {
	/** `true` accepts any warnings; a list of codes accepts exactly the warnings shown. */
	confirm: boolean | string[];
	now?: string;
	unitSystem?: UnitSystem;
	/**
	 * The end the planner was shown (the form): when the end now works out differently, nothing is
	 * saved and the plan comes back to be read first. Left out by the API.
	 */
	shownEndsAt?: string | null;
}

/**
 * Whether the warnings were accepted: `true` accepts any; a list of codes accepts exactly the
 * warnings the planner was shown (the same codes, as many times), so a changed booking with a new
 * warning is asked about again.
 */
export function warningsAccepted(warnings: BookingCheck[], confirm: boolean | string[]): boolean {
	if (warnings.length === 0 || confirm === true) return true;
	if (confirm === false) return false;
	const seen = [...confirm].sort().join(',');
	return (
		seen ===
		warnings
			.map((w) => w.code)
			.sort()
			.join(',')
	);
}

function planOf(ev: Extract<Evaluation, { ok: true }>, input: NewBookingInput): BookingPlan {
	return {
		die: ev.die.number,
		press: ev.press?.name ?? input.press,
		cavities: ev.die.cavities,
		parts: input.parts,
		scrapPct: input.scrapPct,
		shotsNeeded: ev.shotsNeeded,
		shotsPerHour: ev.shotsPerHour,
		rateSource: ev.rateSource,
		pressHours: ev.pressHours,
		dieChangeMinutes: ev.dieChangeMinutes,
		preheatMinutes: ev.preheatMinutes,
		startsAt: ev.startsAt,
		endsAt: ev.endsAt,
		workedOutEndsAt: ev.workedOutEndsAt,
		endOverridden: ev.endsAt !== ev.workedOutEndsAt,
		verdict: ev.verdict,
		blocks: ev.blocks,
		warnings: ev.warnings
	};
}

type Judged =
	| Exclude<SaveBookingResult, { ok: true } | { kind: 'gone' }>
	| {
			ok: true;
			ev: Extract<Evaluation, { ok: true }>;
			plan: BookingPlan;
			endReason: string | null;
	  };

/**
 * The one path every booking write takes (form, API, create, edit, move): the verdict (`judgeRun`)
 * on the booking as it would be, the end worked out or its override explained, the plan shown
 * back when the form's planner has not read it yet, blocks refused, warnings confirmed.
 */
async function judgeBooking(
	db: DB,
	input: NewBookingInput,
	actor: BookingActor,
	options: SaveOptions,
	now: string,
	excludeBookingId?: number
): Promise<Judged> {
	const ev = await judgeRun(
		db,
		{
			die: input.die,
			press: input.press,
			startsAt: input.startsAt,
			endsAt: input.endsAt ?? null,
			parts: input.parts,
			scrapPct: input.scrapPct,
			shotsPerHour: input.shotsPerHour ?? null
		},
		{
			now,
			scope: { customerId: actor.customerId },
			excludeBookingId,
			unitSystem: options.unitSystem
		}
	);
	if (!ev.ok) return { ok: false, kind: 'invalid', field: ev.field, message: ev.message };
	if (!ev.press) return { ok: false, kind: 'invalid', field: 'press', message: 'Choose a press.' };
	const plan = planOf(ev, input);
	if (ev.blocks.length > 0) {
		return { ok: false, kind: 'blocked', blocks: ev.blocks, warnings: ev.warnings, plan };
	}
	const reason = input.endReason?.trim() || null;
	if (plan.endOverridden && !reason) {
		return {
			ok: false,
			kind: 'invalid',
			field: 'endReason',
			message: `The end worked out is ${formatDateTime(ev.workedOutEndsAt)}. Say why this booking ends at another time, or leave the end empty to use the worked-out one.`
		};
	}
	if (Date.parse(ev.endsAt) - Date.parse(ev.startsAt) > MAX_BOOKING_DAYS * DAY_MS) {
		return {
			ok: false,
			kind: 'invalid',
			field: 'endsAt',
			message: `This run works out at more than ${MAX_BOOKING_DAYS} days; split it into several bookings.`
		};
	}
	if (options.shownEndsAt !== undefined && options.shownEndsAt !== ev.endsAt) {
		return { ok: false, kind: 'review', plan };
	}
	if (!warningsAccepted(ev.warnings, options.confirm)) {
		return { ok: false, kind: 'confirm', warnings: ev.warnings, plan };
	}
	return { ok: true, ev, plan, endReason: plan.endOverridden ? reason : null };
}

async function recordChange(
	db: DB,
	row: {
		bookingId: number;
		actor: BookingActor;
		kind: 'create' | 'edit';
		changes: Record<string, unknown>;
		before: Verdict | null;
		after: BookingPlan;
		at: string;
	}
) {
	await db
		.insertInto('booking_changes')
		.values({
			booking_id: row.bookingId,
			changed_at: row.at,
			changed_by: row.actor.userId,
			token_id: row.actor.tokenId,
			kind: row.kind,
			changes: JSON.stringify(row.changes),
			verdict_before: row.before,
			verdict_after: row.after.verdict,
			reasons_after: JSON.stringify(
				[...row.after.blocks, ...row.after.warnings].map((c) => ({
					code: c.code,
					message: c.message
				}))
			)
		})
		.execute();
}

/**
 * Books a die on a press after every check, in one transaction so two planners cannot take the
 * same slot. Blocks refuse the booking outright; warnings need `confirm`.
 */
export async function createBooking(
	db: DB,
	input: NewBookingInput,
	actor: BookingActor,
	options: SaveOptions
): Promise<SaveBookingResult> {
	const now = options.now ?? nowIso();
	return writeTransaction(db, async (trx) => {
		const judged = await judgeBooking(trx, input, actor, options, now);
		if (!judged.ok) return judged;
		const { ev, plan } = judged;
		const row = await trx
			.insertInto('press_bookings')
			.values({
				die_id: ev.die.id,
				machine_id: ev.press!.id,
				starts_at: ev.startsAt,
				ends_at: ev.endsAt,
				order_ref: input.orderRef,
				parts: input.parts,
				scrap_pct: input.scrapPct,
				shots_per_hour: ev.shotsPerHour,
				created_by: actor.userId,
				created_at: now,
				cancelled_at: null,
				cancelled_by: null,
				cancel_reason: null,
				notes: input.notes || null,
				end_reason: judged.endReason
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		const fields = rowFields(fieldsAfter(judged, input));
		await recordChange(trx, {
			bookingId: row.id,
			actor,
			kind: 'create',
			changes: fields,
			before: null,
			after: plan,
			at: now
		});
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				tokenId: actor.tokenId,
				action: 'booking.create',
				dieId: ev.die.id,
				detail: {
					booking: row.id,
					press: plan.press,
					order: input.orderRef,
					startsAt: ev.startsAt,
					endsAt: ev.endsAt,
					parts: input.parts,
					endReason: judged.endReason,
					warningsAccepted: ev.warnings.map((w) => w.message)
				}
			},
			now
		);
		return { ok: true, id: row.id, warnings: ev.warnings, plan, changed: Object.keys(fields) };
	});
}

/** The fields a booking's history compares, by the names the history shows. */
interface BookingFields {
	press: string;
	starts_at: string;
	ends_at: string;
	parts: number;
	scrap_pct: number;
	shots_per_hour: number;
	order_ref: string;
	notes: string | null;
	end_reason: string | null;
}

const HISTORY_FIELDS: Record<keyof BookingFields, string> = {
	press: 'press',
	starts_at: 'start',
	ends_at: 'end',
	parts: 'parts',
	scrap_pct: 'scrap %',
	shots_per_hour: 'shots/h',
	order_ref: 'order',
	notes: 'notes',
	end_reason: 'end reason'
};

/** The booking's fields as a judged write leaves them. */
function fieldsAfter(judged: Extract<Judged, { ok: true }>, input: NewBookingInput): BookingFields {
	return {
		press: judged.plan.press,
		starts_at: judged.ev.startsAt,
		ends_at: judged.ev.endsAt,
		parts: input.parts,
		scrap_pct: input.scrapPct,
		shots_per_hour: judged.ev.shotsPerHour,
		order_ref: input.orderRef,
		notes: input.notes || null,
		end_reason: judged.endReason
	};
}

function rowFields(f: BookingFields): Record<string, unknown> {
	return Object.fromEntries(
		(Object.keys(HISTORY_FIELDS) as (keyof BookingFields)[]).map((k) => [HISTORY_FIELDS[k], f[k]])
	);
}

/** Field → [before, after] for every field that differs. */
function diffFields(
	before: BookingFields,
	after: BookingFields
): Record<string, [unknown, unknown]> {
	const out: Record<string, [unknown, unknown]> = {};
	for (const k of Object.keys(HISTORY_FIELDS) as (keyof BookingFields)[]) {
		if (before[k] !== after[k]) out[HISTORY_FIELDS[k]] = [before[k], after[k]];
	}
	return out;
}

/**
 * Edits or moves a booking that has not ended (press, start, end, parts, scrap, rate, order,
 * notes): the changed booking goes through the same checks as a new one, against every other
 * booking, and the change is kept in the booking's history with the verdict before and after.
 */
export async function updateBooking(
	db: DB,
	id: number,
	input: NewBookingInput,
	actor: BookingActor,
	options: SaveOptions
): Promise<SaveBookingResult> {
	const now = options.now ?? nowIso();
	return writeTransaction(db, async (trx) => {
		const current = await trx
			.selectFrom('press_bookings as b')
			.innerJoin('dies', 'dies.id', 'b.die_id')
			.innerJoin('machines', 'machines.id', 'b.machine_id')
			.selectAll('b')
			.select([
				'dies.number as dieNumber',
				'dies.customer_id as dieCustomerId',
				'machines.name as pressName'
			])
			.where('b.id', '=', id)
			.executeTakeFirst();
		if (!current || (actor.customerId !== null && current.dieCustomerId !== actor.customerId)) {
			return { ok: false, kind: 'gone', status: 404, message: 'There is no such booking.' };
		}
		if (current.cancelled_at) {
			return {
				ok: false,
				kind: 'gone',
				status: 409,
				message: 'This booking is cancelled; book the run again instead.'
			};
		}
		if (current.ends_at <= now) {
			return {
				ok: false,
				kind: 'gone',
				status: 409,
				message: 'This booking has ended; it stays on record as it was.'
			};
		}
		if (input.die.trim().toUpperCase() !== current.dieNumber) {
			return {
				ok: false,
				kind: 'invalid',
				field: 'die',
				message: `This booking is for ${current.dieNumber}. To run another die, cancel it and book that die.`
			};
		}
		const judged = await judgeBooking(trx, input, actor, options, now, id);
		if (!judged.ok) return judged;
		const { ev, plan } = judged;
		const beforeEv = await judgeRun(
			trx,
			{
				die: current.dieNumber,
				press: current.pressName,
				startsAt: current.starts_at,
				endsAt: current.ends_at,
				parts: current.parts,
				scrapPct: current.scrap_pct,
				shotsPerHour: current.shots_per_hour
			},
			{ now, excludeBookingId: id, unitSystem: options.unitSystem }
		);
		const before: BookingFields = {
			press: current.pressName,
			starts_at: current.starts_at,
			ends_at: current.ends_at,
			parts: current.parts,
			scrap_pct: current.scrap_pct,
			shots_per_hour: current.shots_per_hour,
			order_ref: current.order_ref,
			notes: current.notes,
			end_reason: current.end_reason
		};
		const after = fieldsAfter(judged, input);
		const changes = diffFields(before, after);
		if (Object.keys(changes).length === 0) {
			return { ok: true, id, warnings: ev.warnings, plan, changed: [] };
		}
		await trx
			.updateTable('press_bookings')
			.set({
				machine_id: ev.press!.id,
				starts_at: after.starts_at,
				ends_at: after.ends_at,
				parts: after.parts,
				scrap_pct: after.scrap_pct,
				shots_per_hour: after.shots_per_hour,
				order_ref: after.order_ref,
				notes: after.notes,
				end_reason: after.end_reason,
				updated_at: now,
				updated_by: actor.userId
			})
			.where('id', '=', id)
			.execute();
		await recordChange(trx, {
			bookingId: id,
			actor,
			kind: 'edit',
			changes,
			before: beforeEv.ok ? beforeEv.verdict : null,
			after: plan,
			at: now
		});
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				tokenId: actor.tokenId,
				action: 'booking.edit',
				dieId: ev.die.id,
				detail: {
					booking: id,
					order: after.order_ref,
					before: Object.fromEntries(Object.entries(changes).map(([k, v]) => [k, v[0]])),
					after: Object.fromEntries(Object.entries(changes).map(([k, v]) => [k, v[1]])),
					verdictBefore: beforeEv.ok ? beforeEv.verdict : null,
					verdictAfter: plan.verdict,
					warningsAccepted: ev.warnings.map((w) => w.message)
				}
			},
			now
		);
		return { ok: true, id, warnings: ev.warnings, plan, changed: Object.keys(changes) };
	});
}

export interface BookingHistoryEntry {
	id: number;
	at: string;
	who: string;
	kind: 'create' | 'edit';
	/** For an edit: field → [before, after]; for a create: field → value. */
	changes: Record<string, unknown>;
	verdictBefore: Verdict | null;
	verdictAfter: Verdict;
	reasonsAfter: string[];
	reasonCodesAfter: string[];
}

/** A booking's history, oldest first: who changed what, when, and the verdict before and after. */
export async function listBookingHistory(
	db: DB,
	bookingId: number
): Promise<BookingHistoryEntry[]> {
	const rows = await db
		.selectFrom('booking_changes as c')
		.leftJoin('users', 'users.id', 'c.changed_by')
		.leftJoin('api_tokens', 'api_tokens.id', 'c.token_id')
		.select([
			'c.id',
			'c.changed_at',
			'c.kind',
			'c.changes',
			'c.verdict_before',
			'c.verdict_after',
			'c.reasons_after',
			'users.name as userName',
			'api_tokens.name as tokenName'
		])
		.where('c.booking_id', '=', bookingId)
		// Written in order, so the id is the order of the changes.
		.orderBy('c.id')
		.execute();
	return rows.map((r) => ({
		id: r.id,
		at: r.changed_at,
		who: r.userName ?? (r.tokenName ? `API token “${r.tokenName}”` : 'Castellan'),
		kind: r.kind,
		changes: JSON.parse(r.changes) as Record<string, unknown>,
		verdictBefore: r.verdict_before,
		verdictAfter: r.verdict_after,
		reasonsAfter: (JSON.parse(r.reasons_after) as { message: string }[]).map((c) => c.message),
		reasonCodesAfter: (JSON.parse(r.reasons_after) as { code: string }[]).map((c) => c.code)
	}));
}
