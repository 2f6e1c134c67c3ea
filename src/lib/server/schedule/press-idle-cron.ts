import cron, { type ScheduledTask } from 'node-cron';
import { building } from '$app/environment';
import { env } from '$env/dynamic/private';
import { getDb } from '../db';
import { idleMinutesFromEnv, releaseIdleDies } from './press-feed';

const STATE = Symbol.for('castellan.pressIdleCron');
type WithState = typeof globalThis & { [STATE]?: ScheduledTask | true };

/**
 * Every minute, running dies whose press has gone quiet for PRESS_IDLE_MINUTES (default 120) go
 * back to ready with a note. Once per process; the update only moves dies still running, so two
 * processes doing it at once change each die once.
 */
export function startPressIdleCron(): void {
	const holder = globalThis as WithState;
	if (building || holder[STATE] || env.PRESS_IDLE_CHECK === 'off') return;
	holder[STATE] = true;
	const minutes = idleMinutesFromEnv(env.PRESS_IDLE_MINUTES);
	holder[STATE] = cron.schedule(
		'* * * * *',
		async () => {
			try {
				const released = await releaseIdleDies(getDb(), minutes);
				if (released.length) {
					console.log(
						`Castellan presses: back to ready after ${minutes} quiet minutes: ${released.join(', ')}`
					);
				}
			} catch (err) {
				console.error('Castellan presses: idle check failed:', (err as Error).message);
			}
		},
		{ name: 'castellan-press-idle', noOverlap: true }
	);
}

/** Stops the idle check (the server shutting down). */
export async function stopPressIdleCron(): Promise<void> {
	const holder = globalThis as WithState;
	const task = holder[STATE];
	holder[STATE] = undefined;
	if (task && task !== true) await task.destroy();
}
