// The gateway's memory across restarts: one JSON file, replaced atomically (write a temporary file,
// flush it to disk, rename over the old one), so a kill at any moment leaves either the old or the
// new state, never half of one.
import fs from 'node:fs';
import path from 'node:path';
import { emptyState, type GatewayState } from './press-counters';

export function loadState(file: string): GatewayState {
	let text: string;
	try {
		text = fs.readFileSync(file, 'utf8');
	} catch (err) {
		if ((err as NodeJS.ErrnoException).code === 'ENOENT') return emptyState();
		throw err;
	}
	const state = JSON.parse(text) as GatewayState;
	if (state?.version !== 1 || typeof state.presses !== 'object') {
		throw new Error(`${file} is not a press gateway state file (version 1).`);
	}
	return state;
}

/**
 * Replaces the state file. `durable` also flushes it to the disk (power loss); without it the
 * write survives a killed process, which is what every message needs, at a fraction of the cost.
 */
export function saveState(file: string, state: GatewayState, durable = true): void {
	fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
	const tmp = `${file}.${process.pid}.tmp`;
	const fd = fs.openSync(tmp, 'w');
	try {
		fs.writeSync(fd, JSON.stringify(state));
		if (durable) fs.fsyncSync(fd);
	} finally {
		fs.closeSync(fd);
	}
	fs.renameSync(tmp, file);
}
