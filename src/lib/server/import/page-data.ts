import type { DB } from '../db/connect';
import { listAlloys } from '../settings/alloys';
import { loadDraft, previewImport } from './draft';
import { importProgress } from './jobs';
import type { ImportOutcome, ImportPreview } from './types';

/** Rows without a problem shown per sheet; the rest are counted. */
const CLEAN_ROWS_SHOWN = 30;

/** What the import page shows: the upload form, or one draft with its mapping and preview. */
export async function loadImportPage(db: DB, draftId: string | null, userId: string) {
	if (!draftId) return { draft: null };
	const draft = await loadDraft(db, draftId, userId);
	if (!draft) return { draft: null };
	const p = draft.payload;
	const sheets = p.sheets.map((s) => ({
		kind: s.kind,
		name: s.name,
		headers: s.headers,
		rows: s.rows.length
	}));
	let state = draft.state;
	let result = draft.result as ImportOutcome | { message: string } | null;
	const progress = importProgress(draft);
	if (state === 'running' && !progress) {
		// The process that ran it stopped: its transaction never committed.
		state = 'failed';
		result = { message: 'The import was interrupted (the server restarted); nothing was written.' };
	}
	let preview: (ImportPreview & { hiddenClean: number }) | null = null;
	if (state === 'open') {
		const full = await previewImport(db, p);
		let hiddenClean = 0;
		const trimmed = full.sheets.map((s) => {
			let clean = 0;
			const rows = s.rows.filter((r) => {
				if (r.problems.length || r.skipped) return true;
				clean++;
				if (clean <= CLEAN_ROWS_SHOWN) return true;
				hiddenClean++;
				return false;
			});
			return { ...s, rows };
		});
		preview = { ...full, sheets: trimmed, hiddenClean };
	}
	const [customers, alloys] = await Promise.all([
		db.selectFrom('customers').select(['id', 'code', 'name']).orderBy('name').execute(),
		listAlloys(db)
	]);
	return {
		draft: {
			id: draft.id,
			fileName: p.fileName,
			state,
			mode: p.mode,
			mapping: p.mapping,
			sheets,
			fixes: p.fixes,
			progress: progress ?? { done: draft.progressDone, total: draft.progressTotal },
			result
		},
		preview,
		customers,
		alloys: alloys.map((a) => ({ id: a.id, code: a.code, name: a.name, family: a.family }))
	};
}
