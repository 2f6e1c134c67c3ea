import { env } from '$env/dynamic/private';
import { openDatabase, rawHandle, type DB } from '../db/connect';
import { commitImport } from './commit';
import type { ImportPayload } from './types';

/** Imports under way in this process, by draft id: dies written so far and in all. */
const running = new Map<string, { done: number; total: number }>();

export function importProgress(draftId: string) {
	return running.get(draftId) ?? null;
}

/**
 * Starts the commit of a draft and returns at once; the page polls the progress. The write goes
 * through a connection of its own (WAL), so other users keep reading the register meanwhile.
 */
export async function startImportJob(
	db: DB,
	draftId: string,
	payload: ImportPayload,
	userId: string
) {
	const claimed = await db
		.updateTable('import_drafts')
		.set({ state: 'running', progress_done: 0, progress_total: 0 })
		.where('id', '=', draftId)
		.where('state', '=', 'open')
		.executeTakeFirst();
	if (Number(claimed.numUpdatedRows) !== 1) return false;
	running.set(draftId, { done: 0, total: 0 });
	const path = env.DATABASE_PATH || './data/castellan.db';
	setImmediate(async () => {
		const own = path === ':memory:' ? null : openDatabase(path);
		let state: 'done' | 'failed' | 'open' = 'failed';
		let result: unknown;
		try {
			const res = await commitImport(db, payload, {
				userId,
				raw: own ? rawHandle(own) : undefined,
				onProgress: (done, total) => running.set(draftId, { done, total })
			});
			// A refused commit (the register changed since the preview) leaves the draft open to fix.
			state = res.ok ? 'done' : 'open';
			result = res.ok ? res.outcome : { message: res.message };
		} catch (e) {
			result = { message: `The import failed and wrote nothing: ${(e as Error).message}` };
		} finally {
			await own?.destroy();
			const p = running.get(draftId) ?? { done: 0, total: 0 };
			running.delete(draftId);
			await db
				.updateTable('import_drafts')
				.set({
					state,
					result: JSON.stringify(result),
					progress_done: p.done,
					progress_total: p.total
				})
				.where('id', '=', draftId)
				.execute();
		}
	});
	return true;
}
