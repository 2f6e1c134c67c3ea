import { randomBytes } from 'node:crypto';
import type { DB } from '../db/connect';
import { inReadSession } from '../db/session';
import { guessMapping, IMPORT_FIELDS, type ImportKind } from '../../import-fields';
import { analyzeImport } from './analyze';
import type { ImportSheet } from './read-file';
import type { ImportPayload, ImportPreview } from './types';

/** Drafts older than this are dropped when a new one is made. */
const DRAFT_DAYS = 7;

/** The plant's remembered mapping of one sheet kind, if any. */
export async function loadMapping(
	db: DB,
	kind: ImportKind
): Promise<Record<string, string> | null> {
	const row = await db
		.selectFrom('import_mappings')
		.select('mapping')
		.where('kind', '=', kind)
		.executeTakeFirst();
	return row ? (JSON.parse(row.mapping) as Record<string, string>) : null;
}

/** Remembers a mapping for the plant: the next file of the same kind starts from it. */
export async function rememberMapping(
	db: DB,
	kind: ImportKind,
	mapping: Record<string, string>,
	userId: string | null
) {
	const text = JSON.stringify(mapping);
	const at = new Date().toISOString();
	await db
		.insertInto('import_mappings')
		.values({ kind, mapping: text, updated_at: at, updated_by: userId })
		.onConflict((oc) =>
			oc.column('kind').doUpdateSet({ mapping: text, updated_at: at, updated_by: userId })
		)
		.execute();
}

/**
 * The starting mapping of a sheet: the plant's remembered one where its headers are in this
 * sheet, the headers that name a field otherwise.
 */
export async function startMapping(db: DB, sheet: ImportSheet): Promise<Record<string, string>> {
	const guessed = guessMapping(sheet.kind, sheet.headers);
	const remembered = await loadMapping(db, sheet.kind);
	if (!remembered) return guessed;
	const mapping = { ...guessed };
	for (const f of IMPORT_FIELDS[sheet.kind]) {
		const header = remembered[f.key];
		if (header && sheet.headers.includes(header)) mapping[f.key] = header;
	}
	return mapping;
}

/** A fresh payload for an uploaded file. */
export async function newPayload(
	db: DB,
	fileName: string,
	sheets: ImportSheet[]
): Promise<ImportPayload> {
	const mapping: ImportPayload['mapping'] = {};
	for (const s of sheets) mapping[s.kind] = await startMapping(db, s);
	return {
		fileName,
		sheets,
		mapping,
		mode: 'create',
		fixes: {},
		skips: [],
		owners: {},
		alloys: {}
	};
}

export async function createDraft(db: DB, userId: string, payload: ImportPayload): Promise<string> {
	const id = randomBytes(16).toString('hex');
	const now = new Date();
	const old = new Date(now.getTime() - DRAFT_DAYS * 86_400_000).toISOString();
	await db.deleteFrom('import_drafts').where('created_at', '<', old).execute();
	await db
		.insertInto('import_drafts')
		.values({
			id,
			user_id: userId,
			file_name: payload.fileName.slice(0, 200),
			created_at: now.toISOString(),
			payload: JSON.stringify(payload)
		})
		.execute();
	return id;
}

export interface Draft {
	id: string;
	state: 'open' | 'running' | 'done' | 'failed';
	payload: ImportPayload;
	progressDone: number;
	progressTotal: number;
	/** When the commit running it last said it is alive (see jobs.ts), or null. */
	heartbeatAt: string | null;
	result: unknown;
}

/** A draft of this user (another user's draft id answers like a missing one). */
export async function loadDraft(db: DB, id: string, userId: string): Promise<Draft | null> {
	if (!/^[0-9a-f]{32}$/.test(id)) return null;
	const row = await db
		.selectFrom('import_drafts')
		.selectAll()
		.where('id', '=', id)
		.where('user_id', '=', userId)
		.executeTakeFirst();
	if (!row) return null;
	return {
		id: row.id,
		state: row.state,
		payload: JSON.parse(row.payload) as ImportPayload,
		progressDone: row.progress_done,
		progressTotal: row.progress_total,
		heartbeatAt: row.heartbeat_at,
		result: row.result ? JSON.parse(row.result) : null
	};
}

export async function saveDraft(db: DB, id: string, payload: ImportPayload) {
	await db
		.updateTable('import_drafts')
		.set({ payload: JSON.stringify(payload) })
		.where('id', '=', id)
		.where('state', '=', 'open')
		.execute();
}

/** The preview of a payload against the register as it is now; reads only. */
export async function previewImport(db: DB, payload: ImportPayload): Promise<ImportPreview> {
	const now = new Date().toISOString();
	return inReadSession(db, async (s) => (await analyzeImport(s, payload, now)).preview);
}
