import os from 'node:os';
import type { RunCoordinator } from 'node-cron';
import type { DB } from '../db/connect';
import { inWriteTransaction } from '../db/session';
import { nowIso } from '../time';

/**
 * Each app process on a plant database schedules the notice job with node-cron. node-cron asks a
 * run coordinator before each scheduled slot, with a key naming the task and the slot's instant
 * (`castellan-notices:2026-03-02T05:00:00.000Z`); this one answers from the `job_runs` table:
 * the process whose row goes in first runs the slot, every other process skips it. The same on
 * SQLite and PostgreSQL, and independent of which process's clock fires first or how long a run
 * takes. (The outbox's unique keys and the delivery claims still make any overlap harmless; the
 * slot row makes it not happen.)
 */

/** Slot rows older than this are deleted (the five-minute delivery tick alone adds 288 a day). */
export const RUN_SLOT_KEEP_DAYS = 7;

/** Host name and process id, recorded with each slot a process takes. */
export function processName(): string {
	return `${os.hostname()}:${process.pid}`;
}

/** True for the one caller that takes `key` first, on any number of processes; false after. */
export async function takeRunSlot(
	db: DB,
	key: string,
	takenBy: string = processName(),
	now: string = nowIso()
): Promise<boolean> {
	// Under the notices lock like every outbox write: on SQLite the wait for the write lock then
	// never blocks this process's event loop.
	return inWriteTransaction(db, { lock: 'notices' }, async (s) => {
		const { changes } = await s.run(
			`insert into job_runs (run_key, taken_by, taken_at, finished_at) values (?, ?, ?, null)
			 on conflict (run_key) do nothing`,
			[key, takenBy, now]
		);
		if (changes !== 1) return false;
		const before = new Date(Date.parse(now) - RUN_SLOT_KEEP_DAYS * 86_400_000).toISOString();
		await s.run('delete from job_runs where taken_at < ?', [before]);
		return true;
	});
}

/** Records that the slot's run ended (well or not: errors are logged by the job itself). */
export async function finishRunSlot(db: DB, key: string, now: string = nowIso()): Promise<void> {
	await inWriteTransaction(db, { lock: 'notices' }, (s) =>
		s.run('update job_runs set finished_at = ? where run_key = ?', [now, key])
	);
}

/**
 * node-cron's run coordinator over `job_runs`. `open` gives the database when a slot comes up
 * (the app opens it lazily). A database error skips the slot (node-cron fails closed and logs it).
 */
export function runSlotCoordinator(
	open: () => DB,
	takenBy: string = processName()
): RunCoordinator {
	return {
		shouldRun: (key) => takeRunSlot(open(), key, takenBy),
		onComplete: (key) => finishRunSlot(open(), key)
	};
}
