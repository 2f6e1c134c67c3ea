import { engineOf, openDatabase, rawHandle, type DB } from '../db/connect';
import { commitImport } from './commit';
import type { Draft } from './draft';
import type { ImportPayload } from './types';

export interface ImportProgress {
	done: number;
	total: number;
}

/** Imports under way in this process, by draft id: dies written so far and in all. */
const running = new Map<string, ImportProgress>();

/** How often a running import writes its progress and heartbeat to its draft (PostgreSQL). */
const HEARTBEAT_MS = 10_000;
/** A running draft with no heartbeat for this long was left by a process that stopped. */
const HEARTBEAT_STALE_MS = 60_000;

/**
 * The progress of a running import, or null when none runs: this process's own count, else (when
 * app processes share a PostgreSQL database) what the process writing it last put in the draft,
 * as long as its heartbeat is fresh.
 */
export function importProgress(draft: Draft, now = Date.now()): ImportProgress | null {
	const own = running.get(draft.id);
	if (own) return own;
	if (draft.state !== 'running' || !draft.heartbeatAt) return null;
	if (now - Date.parse(draft.heartbeatAt) > HEARTBEAT_STALE_MS) return null;
	return { done: draft.progressDone, total: draft.progressTotal };
}

/**
 * The database the background commit writes through, and how to let go of it.
 * PostgreSQL: the app's own pool; the transaction holds one pooled connection and the others
 * keep answering. SQLite: a second connection to the same file, because Kysely's SQLite dialect
 * has a single connection, and the import's transaction would hold it for the whole write
 * (seconds for a large register), queueing every other request of the app behind it; on a
 * connection of its own the app keeps reading the last committed register (WAL) meanwhile.
 * An in-memory database has no file to open twice and writes through its one connection.
 */
function openWriter(db: DB): { writer: DB; close: () => Promise<void> } {
	const shared = { writer: db, close: async () => {} };
	if (engineOf(db) === 'postgres') return shared;
	const raw = rawHandle(db);
	if (raw.memory) return shared;
	const own = openDatabase(raw.name);
	return { writer: own, close: () => own.destroy() };
}

/**
 * Starts the commit of a draft and returns at once; the page polls the progress. On PostgreSQL
 * the progress and a heartbeat go to the draft row every few seconds (outside the import's
 * transaction), so any app process can show it. On SQLite the writer holds the file's write lock
 * for the whole commit, so the progress stays in this process (SQLite runs one app process).
 */
export async function startImportJob(
	db: DB,
	draftId: string,
	payload: ImportPayload,
	userId: string
) {
	const claimed = await db
		.updateTable('import_drafts')
		.set({
			state: 'running',
			progress_done: 0,
			progress_total: 0,
			heartbeat_at: new Date().toISOString()
		})
		.where('id', '=', draftId)
		.where('state', '=', 'open')
		.executeTakeFirst();
	if (Number(claimed.numUpdatedRows) !== 1) return false;
	running.set(draftId, { done: 0, total: 0 });
	const beat = async () => {
		const p = running.get(draftId);
		if (!p) return;
		await db
			.updateTable('import_drafts')
			.set({
				progress_done: p.done,
				progress_total: p.total,
				heartbeat_at: new Date().toISOString()
			})
			.where('id', '=', draftId)
			.where('state', '=', 'running')
			.execute();
	};
	const heartbeat =
		engineOf(db) === 'postgres'
			? setInterval(() => beat().catch(() => undefined), HEARTBEAT_MS)
			: undefined;
	setImmediate(async () => {
		const { writer, close } = openWriter(db);
		let state: 'done' | 'failed' | 'open' = 'failed';
		let result: unknown;
		try {
			const res = await commitImport(writer, payload, {
				userId,
				onProgress: (done, total) => running.set(draftId, { done, total })
			});
			// A refused commit (the register changed since the preview) leaves the draft open to fix.
			state = res.ok ? 'done' : 'open';
			result = res.ok ? res.outcome : { message: res.message };
		} catch (e) {
			result = { message: `The import failed and wrote nothing: ${(e as Error).message}` };
		} finally {
			clearInterval(heartbeat);
			await close();
			const p = running.get(draftId) ?? { done: 0, total: 0 };
			await db
				.updateTable('import_drafts')
				.set({
					state,
					result: JSON.stringify(result),
					progress_done: p.done,
					progress_total: p.total,
					heartbeat_at: null
				})
				.where('id', '=', draftId)
				.execute();
			running.delete(draftId);
		}
	});
	return true;
}
