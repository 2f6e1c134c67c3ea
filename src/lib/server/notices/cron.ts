import cron, { type ScheduledTask } from 'node-cron';
import { building } from '$app/environment';
import { env } from '$env/dynamic/private';
import { plantZone } from '../../plant-time';
import { getDb } from '../db';
import { createMailer, type Mailer } from '../mail/transport';
import { nowIso } from '../time';
import { readNoticeConfig, type NoticeConfig } from './config';
import { runNotices } from './run';
import { runSlotCoordinator } from './run-slots';
import { sendPending } from './send';
import { startDueServiceWindows } from '../schedule/service-windows';

/**
 * Between daily runs, a light tick sends only what is pending and due: retries after their
 * back-off and "ready again" mails queued when a toolroom job closes. With nothing pending it is
 * one indexed query.
 */
const DELIVERY_TICK = '*/5 * * * *';

interface NoticeCron {
	config: NoticeConfig;
	mailer: Mailer;
	tasks: ScheduledTask[];
	/** Runs and ticks of this process go one after the other, never side by side. */
	queue: Promise<unknown>;
}

// Kept on globalThis so that a module reloaded by the dev server does not start a second job.
const STATE = Symbol.for('castellan.noticeCron');
type WithState = typeof globalThis & { [STATE]?: NoticeCron };
const holder = globalThis as WithState;

function exclusive(state: NoticeCron, label: string, job: () => Promise<string>): Promise<void> {
	const next = state.queue.then(job).then(
		(line) => console.log(`Castellan notices (${label}): ${line}`),
		(error: unknown) =>
			console.error(`Castellan notices (${label}) failed:`, (error as Error)?.message ?? error)
	);
	state.queue = next;
	return next;
}

/**
 * Service windows whose start has come become toolroom jobs before anything is sent, so their
 * notices leave with the same send. Runs on every tick: a window starts within five minutes.
 */
async function startWindows(): Promise<string> {
	// A failure here is reported and never keeps the mail from going out.
	const w = await startDueServiceWindows(getDb(), nowIso()).catch((error: unknown) => {
		console.error('Castellan service windows failed:', (error as Error)?.message ?? error);
		return null;
	});
	if (!w) return '';
	if (w.started.length === 0 && w.problems.length === 0) return '';
	const problems = w.problems.map((p) => `window ${p.windowId}: ${p.message}`).join('; ');
	return `; service windows started: ${w.started.map((s) => `${s.die} ${s.jobNumber}`).join(', ') || 'none'}${problems ? `; not started: ${problems}` : ''}`;
}

function runOnce(state: NoticeCron): Promise<void> {
	return exclusive(state, 'daily run', async () => {
		const windows = await startWindows();
		const r = await runNotices(getDb(), {
			now: nowIso(),
			mailer: state.mailer,
			origin: state.config.origin,
			threshold: state.config.threshold
		});
		const errors = r.errors.length ? `; last error: ${r.errors.at(-1)}` : '';
		return `${r.items} items, ${r.written} new, ${r.digests} digests sent, ${r.retrying} to retry, ${r.failed} failed${errors}${windows}`;
	});
}

function deliverOnce(state: NoticeCron): Promise<void> {
	return exclusive(state, 'delivery', async () => {
		const windows = await startWindows();
		const r = await sendPending(getDb(), state.mailer, nowIso(), { origin: state.config.origin });
		if (r.digests === 0 && r.retrying === 0 && r.failed === 0 && !windows) return 'nothing due';
		return `${r.digests} digests sent, ${r.retrying} to retry, ${r.failed} failed${windows}`;
	});
}

/**
 * Every app process on the database schedules the job; each scheduled slot runs in the one
 * process that takes its `job_runs` row first (run-slots.ts), so the daily run and each delivery
 * tick happen once per schedule however many processes there are.
 */
const oncePerSlot = () => ({ distributed: true, runCoordinator: runSlotCoordinator(getDb) });

/**
 * Says so when a slot was not run here: the daily run logs that another process has it (the
 * five-minute tick stays quiet), and a database error while claiming the slot is logged as one.
 */
function reportSkips(task: ScheduledTask, label: string, quiet: boolean): ScheduledTask {
	task.on('execution:skipped', (context) => {
		const slot = context.date.toISOString();
		if (context.reason === 'coordinator-error') {
			console.error(`Castellan notices (${label}) failed: the ${slot} slot could not be claimed.`);
		} else if (!quiet) {
			console.log(`Castellan notices (${label}): the ${slot} slot runs in another process.`);
		}
	});
	return task;
}

function scheduleDaily(state: NoticeCron, zone: string): ScheduledTask {
	const task = cron.schedule(state.config.cron!, () => runOnce(state), {
		name: 'castellan-notices',
		noOverlap: true,
		timezone: zone,
		...oncePerSlot()
	});
	return reportSkips(task, 'daily run', false);
}

/**
 * Starts the notice job in this server process: the daily run on NOTICE_CRON (default 06:00
 * plant time — the expression is read on the plant's clock, `zone`) and the delivery tick. Once
 * per process; never while building; not at all when NOTICE_CRON=off. A bad expression is
 * reported and leaves the server running without the job. Returns whether the job is running.
 * `source` is the environment (tests pass their own).
 */
export function startNoticeCron(
	source: Record<string, string | undefined> = env,
	zone = plantZone()
): boolean {
	if (building) return false;
	if (holder[STATE]) return true;
	const config = readNoticeConfig(source);
	if (config.cron === null) {
		console.log('Castellan notices: off (NOTICE_CRON=off).');
		return false;
	}
	if (!cron.validate(config.cron)) {
		console.error(
			`Castellan notices: NOTICE_CRON "${config.cron}" is not a cron expression; the notice job is not started.`
		);
		return false;
	}
	const state: NoticeCron = {
		config,
		mailer: createMailer({ smtpUrl: config.smtpUrl, from: config.from }),
		tasks: [],
		queue: Promise.resolve()
	};
	holder[STATE] = state;
	state.tasks.push(
		scheduleDaily(state, zone),
		reportSkips(
			cron.schedule(DELIVERY_TICK, () => deliverOnce(state), {
				name: 'castellan-notice-delivery',
				noOverlap: true,
				...oncePerSlot()
			}),
			'delivery',
			true
		)
	);
	const next = state.tasks[0].getNextRun();
	console.log(
		`Castellan notices: "${config.cron}" (${zone}), next run ${next ? next.toISOString() : 'unknown'}.`
	);
	return true;
}

/** Moves the daily run onto a new plant clock after the admin changed the zone. */
export async function setNoticeCronZone(zone: string): Promise<void> {
	const state = holder[STATE];
	if (!state) return;
	const [daily, ...rest] = state.tasks;
	await daily.destroy();
	state.tasks = [scheduleDaily(state, zone), ...rest];
}

/** When the daily run next starts, or null when the job is not running. */
export function nextNoticeRun(): Date | null {
	return holder[STATE]?.tasks[0].getNextRun() ?? null;
}

/** Stops the job (tests, shutdown). */
export async function stopNoticeCron(): Promise<void> {
	const state = holder[STATE];
	if (!state) return;
	delete holder[STATE];
	await Promise.all(state.tasks.map((t) => t.destroy()));
	await state.queue;
	state.mailer.close();
}

/**
 * Sends pending deliveries now instead of at the next tick, e.g. right after a toolroom job was
 * closed and its "ready again" mail queued. Does nothing when the job is not running; never
 * throws (errors are logged and the rows retried later).
 */
export function sendNoticesSoon(): void {
	const state = holder[STATE];
	if (state) void deliverOnce(state);
}

/** What the outbox page shows about the schedule: when the next daily run is, or that it is off. */
export interface NoticeSchedule {
	running: boolean;
	cron: string | null;
	/** ISO instant of the next daily run; null when the job is not running. */
	nextRun: string | null;
}

export function noticeSchedule(): NoticeSchedule {
	const state = holder[STATE];
	if (!state) return { running: false, cron: null, nextRun: null };
	const next = state.tasks[0]?.getNextRun();
	return { running: true, cron: state.config.cron, nextRun: next ? next.toISOString() : null };
}

/**
 * The daily run, now (an admin's "run now"): in the queue of this process's job when it runs, so
 * it never overlaps a scheduled run; with a mailer of its own when the job is off. Written
 * notices are keyed, so running now and then at the scheduled time sends nothing twice.
 */
export async function runNoticesNow(
	source: Record<string, string | undefined> = env
): Promise<void> {
	const state = holder[STATE];
	if (state) return runOnce(state);
	const config = readNoticeConfig(source);
	const once: NoticeCron = {
		config,
		mailer: createMailer({ smtpUrl: config.smtpUrl, from: config.from }),
		tasks: [],
		queue: Promise.resolve()
	};
	try {
		await runOnce(once);
	} finally {
		once.mailer.close();
	}
}
