// The gateway's memory across restarts: a JSON state file, replaced atomically (write a temporary
// file, flush it to disk, rename over the old one), and a journal beside it that gets one line per
// message taken in since the last state write. Loading reads the state and replays the journal;
// replaying a message the state already holds changes nothing (its reading is stale by then).
import fs from 'node:fs';
import path from 'node:path';
import { applyRecord, emptyState, type GatewayState, type PressRecord } from './press-counters';

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

/** Replaces the state file, flushed to disk before the rename. */
export function saveState(file: string, state: GatewayState): void {
	fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
	const tmp = `${file}.${process.pid}.tmp`;
	const fd = fs.openSync(tmp, 'w');
	try {
		fs.writeSync(fd, JSON.stringify(state));
		fs.fsyncSync(fd);
	} finally {
		fs.closeSync(fd);
	}
	fs.renameSync(tmp, file);
}

/** The journal: appended to for every message, emptied after each state write. */
export class Journal {
	private fd: number;
	constructor(private file: string) {
		fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
		this.fd = fs.openSync(file, 'a');
	}
	/** One small write: whole or not at all when the process is killed. */
	append(record: PressRecord): void {
		fs.writeSync(this.fd, JSON.stringify(record) + '\n');
	}
	/** After the state holding every journalled message has been written. */
	clear(): void {
		fs.ftruncateSync(this.fd, 0);
	}
	close(): void {
		fs.closeSync(this.fd);
	}
	/** Replays the journal onto a loaded state; a torn last line (power loss) is skipped. */
	static replay(file: string, state: GatewayState): number {
		let text: string;
		try {
			text = fs.readFileSync(file, 'utf8');
		} catch (err) {
			if ((err as NodeJS.ErrnoException).code === 'ENOENT') return 0;
			throw err;
		}
		let n = 0;
		for (const line of text.split('\n')) {
			if (!line.trim()) continue;
			let record: PressRecord;
			try {
				record = JSON.parse(line);
			} catch {
				continue;
			}
			applyRecord(state, record);
			n++;
		}
		return n;
	}
}
