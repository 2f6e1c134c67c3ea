// Counts that arrive from the presses (the press gateway, or any API client that names a press)
// tell Castellan which die is running where. One row per press in `press_feed` keeps the last
// reading; a die whose counts arrive is "running", and one whose press has gone quiet for the
// plant's idle time goes back to "ready" with a note on its history.
import type { DieStatus } from '../../domain';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';

/** Minutes without counts before a running die is taken back to ready (PRESS_IDLE_MINUTES). */
export const DEFAULT_IDLE_MINUTES = 120;

export function idleMinutesFromEnv(value: string | undefined): number {
	const n = Number(value);
	return Number.isFinite(n) && n > 0 ? n : DEFAULT_IDLE_MINUTES;
}

/** One counted entry that named a press (names as the caller sent them, time as stored). */
export interface FedEntry {
	press: string;
	die: string;
	counterEnd: number | null;
	countedAt: string;
}

interface ResolvedEntry {
	pressId: number;
	pressName: string;
	dieId: number;
	counterEnd: number | null;
	countedAt: string;
}

const byName = (name: string) => name.trim().toLowerCase();

const RUNNING_FROM: DieStatus[] = ['ready'];

/**
 * Records what the presses just reported, inside the caller's transaction or on its own: the
 * press's last reading, and the die's state (ready → running). When another die starts counting
 * on a press, the one before it is no longer on that press: running → ready.
 */
export async function notePressFeed(
	db: DB,
	entries: FedEntry[],
	tokenId: number | null,
	receivedAt = nowIso()
): Promise<void> {
	if (!entries.length) return;
	const presses = new Map(
		(await db.selectFrom('machines').select(['id', 'name']).execute()).map((m) => [
			byName(m.name),
			m
		])
	);
	const dieNumbers = [...new Set(entries.map((e) => e.die.trim().toUpperCase()))];
	const dies = new Map(
		(
			await db
				.selectFrom('dies')
				.select(['id', 'number'])
				.where('number', 'in', dieNumbers)
				.execute()
		).map((d) => [d.number, d.id])
	);
	const resolved: ResolvedEntry[] = [];
	for (const e of entries) {
		const press = presses.get(byName(e.press));
		const dieId = dies.get(e.die.trim().toUpperCase());
		if (!press || dieId === undefined) continue;
		resolved.push({
			pressId: press.id,
			pressName: press.name,
			dieId,
			counterEnd: e.counterEnd,
			countedAt: e.countedAt
		});
	}
	const latest = new Map<number, ResolvedEntry & { count: number }>();
	for (const e of resolved) {
		const seen = latest.get(e.pressId);
		if (!seen) latest.set(e.pressId, { ...e, count: 1 });
		else {
			seen.count++;
			if (e.countedAt >= seen.countedAt) Object.assign(seen, { ...e, count: seen.count });
		}
	}
	await writeTransaction(db, async (trx) => {
		for (const e of latest.values()) {
			const before = await trx
				.selectFrom('press_feed')
				.select(['die_id', 'last_counted_at'])
				.where('machine_id', '=', e.pressId)
				.executeTakeFirst();
			// A backfilled batch older than what the press already said does not move the press on.
			if (before && before.last_counted_at > e.countedAt) {
				await trx
					.updateTable('press_feed')
					.set((eb) => ({ entries: eb('entries', '+', e.count), last_received_at: receivedAt }))
					.where('machine_id', '=', e.pressId)
					.execute();
				continue;
			}
			await trx
				.insertInto('press_feed')
				.values({
					machine_id: e.pressId,
					die_id: e.dieId,
					last_counter: e.counterEnd,
					last_counted_at: e.countedAt,
					last_received_at: receivedAt,
					entries: e.count
				})
				.onConflict((oc) =>
					oc.column('machine_id').doUpdateSet((eb) => ({
						die_id: e.dieId,
						last_counter: e.counterEnd,
						last_counted_at: e.countedAt,
						last_received_at: receivedAt,
						entries: eb('press_feed.entries', '+', e.count)
					}))
				)
				.execute();
			const press = { name: e.pressName };
			if (before?.die_id != null && before.die_id !== e.dieId) {
				await moveDie(
					trx,
					before.die_id,
					'running',
					'ready',
					`Another die started counting on press ${press.name}.`,
					tokenId,
					receivedAt
				);
			}
			await moveDie(
				trx,
				e.dieId,
				RUNNING_FROM,
				'running',
				`Counts arriving from press ${press.name}.`,
				tokenId,
				receivedAt
			);
		}
	});
}

async function moveDie(
	trx: DB,
	dieId: number,
	from: DieStatus | DieStatus[],
	to: DieStatus,
	reason: string,
	tokenId: number | null,
	at: string
) {
	const allowed = Array.isArray(from) ? from : [from];
	const moved = await trx
		.updateTable('dies')
		.set({ status: to, updated_at: at })
		.where('id', '=', dieId)
		.where('status', 'in', allowed)
		.returning('status')
		.executeTakeFirst();
	if (!moved) return;
	await writeAudit(
		trx,
		{
			tokenId,
			action: 'die.status',
			dieId,
			detail: { from: allowed.length === 1 ? allowed[0] : 'ready', to, reason }
		},
		at
	);
}

/**
 * Running dies whose press has sent nothing for `idleMinutes` go back to ready, each with a note.
 * Dies set to running by hand, with no counts from a press, are left alone.
 */
export async function releaseIdleDies(
	db: DB,
	idleMinutes: number,
	now = nowIso()
): Promise<string[]> {
	const cutoff = new Date(Date.parse(now) - idleMinutes * 60_000).toISOString();
	const idle = await db
		.selectFrom('press_feed as f')
		.innerJoin('dies as d', 'd.id', 'f.die_id')
		.innerJoin('machines as m', 'm.id', 'f.machine_id')
		.select(['d.id', 'd.number', 'm.name as press'])
		.where('d.status', '=', 'running')
		.where('f.last_received_at', '<', cutoff)
		.execute();
	if (!idle.length) return [];
	await writeTransaction(db, async (trx) => {
		for (const d of idle) {
			await moveDie(
				trx,
				d.id,
				'running',
				'ready',
				`No counts from press ${d.press} for ${idleMinutes} minutes.`,
				null,
				now
			);
		}
	});
	return idle.map((d) => d.number);
}

export interface MountedDie {
	press: string;
	die: string | null;
	/** How Castellan knows: counts from the press (the die is running there), or a booking now. */
	source: 'counts' | 'booking' | null;
	since: string | null;
}

/** Which die is on a press now: the running die counting there, else the booking under way. */
export async function findMountedDie(
	db: DB,
	pressName: string,
	now = nowIso()
): Promise<MountedDie | null> {
	const press = await db
		.selectFrom('machines')
		.select(['id', 'name'])
		.where((eb) => eb(eb.fn('lower', ['name']), '=', byName(pressName)))
		.executeTakeFirst();
	if (!press) return null;
	const fed = await db
		.selectFrom('press_feed as f')
		.innerJoin('dies as d', 'd.id', 'f.die_id')
		.select(['d.number', 'f.last_counted_at'])
		.where('f.machine_id', '=', press.id)
		.where('d.status', '=', 'running')
		.executeTakeFirst();
	if (fed)
		return { press: press.name, die: fed.number, source: 'counts', since: fed.last_counted_at };
	const booking = await db
		.selectFrom('press_bookings as b')
		.innerJoin('dies as d', 'd.id', 'b.die_id')
		.select(['d.number', 'b.starts_at'])
		.where('b.machine_id', '=', press.id)
		.where('b.cancelled_at', 'is', null)
		.where('b.starts_at', '<=', now)
		.where('b.ends_at', '>', now)
		.where('d.status', '<>', 'retired')
		.orderBy('b.starts_at', 'desc')
		.executeTakeFirst();
	if (booking) {
		return { press: press.name, die: booking.number, source: 'booking', since: booking.starts_at };
	}
	return { press: press.name, die: null, source: null, since: null };
}

export interface PressFeedRow {
	pressId: number;
	press: string;
	die: string | null;
	lastCounter: number | null;
	lastCountedAt: string;
	lastReceivedAt: string;
	/** Seconds between the press's reading and its arrival in Castellan. */
	lagSeconds: number;
	/** Minutes since anything arrived. */
	quietMinutes: number;
	entries: number;
}

/** Each press's last report, for the presses page. */
export async function listPressFeed(db: DB, now = nowIso()): Promise<PressFeedRow[]> {
	const rows = await db
		.selectFrom('press_feed as f')
		.innerJoin('machines as m', 'm.id', 'f.machine_id')
		.leftJoin('dies as d', 'd.id', 'f.die_id')
		.select([
			'm.id',
			'm.name',
			'd.number',
			'f.last_counter',
			'f.last_counted_at',
			'f.last_received_at',
			'f.entries'
		])
		.orderBy('m.name')
		.execute();
	const nowMs = Date.parse(now);
	return rows.map((r) => ({
		pressId: r.id,
		press: r.name,
		die: r.number,
		lastCounter: r.last_counter,
		lastCountedAt: r.last_counted_at,
		lastReceivedAt: r.last_received_at,
		lagSeconds: Math.max(
			0,
			Math.round((Date.parse(r.last_received_at) - Date.parse(r.last_counted_at)) / 1000)
		),
		quietMinutes: Math.max(0, Math.floor((nowMs - Date.parse(r.last_received_at)) / 60_000)),
		entries: r.entries
	}));
}
