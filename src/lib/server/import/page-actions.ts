// The import page's steps as functions: the route only checks the role and passes the form.
import { fail, redirect, type ActionFailure } from '@sveltejs/kit';
import type { DB } from '../db/connect';
import { IMPORT_FIELDS, IMPORT_KINDS, type ImportKind } from '../../import-fields';
import {
	draftIdSchema,
	importFixSchema,
	importModeSchema,
	importResolveSchema,
	importSkipSchema
} from '../../schemas/import';
import {
	createDraft,
	loadDraft,
	newPayload,
	rememberMapping,
	saveDraft,
	type Draft
} from './draft';
import { readImportFile, MAX_IMPORT_BYTES, tooLargeMessage } from './read-file';
import { commitImport } from './commit';
import { startImportJob } from './jobs';

type Fail = ActionFailure<{ message: string; field?: string }>;
const bad = (message: string, field?: string, status = 400): Fail =>
	fail(status, { message, field });
const back = (id: string) => redirect(303, `/dies/import?draft=${id}`);

async function openDraft(db: DB, data: FormData, userId: string): Promise<Draft | Fail> {
	const id = draftIdSchema.safeParse(data.get('draft'));
	if (!id.success) return bad('That import is not known. Upload the file again.', 'draft');
	const draft = await loadDraft(db, id.data, userId);
	if (!draft) return bad('That import is not known. Upload the file again.', 'draft', 404);
	if (draft.state !== 'open')
		return bad('This import has already been committed or is running.', 'draft', 409);
	return draft;
}
const isFail = (v: unknown): v is Fail =>
	typeof v === 'object' && v !== null && 'status' in v && 'data' in v;

export async function uploadAction(db: DB, request: Request, userId: string) {
	const data = await request.formData();
	const file = data.get('file');
	if (!(file instanceof File) || file.size === 0)
		return bad('Choose a CSV or Excel (.xlsx) file.', 'file');
	if (file.size > MAX_IMPORT_BYTES) return bad(tooLargeMessage(file.size), 'file', 413);
	const kind = IMPORT_KINDS.includes(data.get('csvKind') as ImportKind)
		? (data.get('csvKind') as ImportKind)
		: 'dies';
	const read = await readImportFile(new Uint8Array(await file.arrayBuffer()), file.name, kind);
	if (!read.ok) return bad(read.message, 'file');
	const id = await createDraft(
		db,
		userId,
		await newPayload(db, file.name.slice(0, 200), read.sheets)
	);
	back(id);
}

export async function mappingAction(db: DB, request: Request, userId: string) {
	const data = await request.formData();
	const draft = await openDraft(db, data, userId);
	if (isFail(draft)) return draft;
	const p = draft.payload;
	for (const sheet of p.sheets) {
		const mapping: Record<string, string> = {};
		const used = new Map<string, string>();
		for (const f of IMPORT_FIELDS[sheet.kind]) {
			const header = String(data.get(`${sheet.kind}.${f.key}`) ?? '');
			if (!header) continue;
			if (!sheet.headers.includes(header))
				return bad(
					`"${header}" is not a column of the ${sheet.name} sheet.`,
					`${sheet.kind}.${f.key}`
				);
			if (used.has(header)) {
				return bad(
					`The column "${header}" is mapped to both ${used.get(header)} and ${f.label}.`,
					`${sheet.kind}.${f.key}`
				);
			}
			used.set(header, f.label);
			mapping[f.key] = header;
		}
		p.mapping[sheet.kind] = mapping;
		await rememberMapping(db, sheet.kind, mapping, userId);
	}
	p.fixes = {};
	await saveDraft(db, draft.id, p);
	back(draft.id);
}

export async function modeAction(db: DB, request: Request, userId: string) {
	const data = await request.formData();
	const parsed = importModeSchema.safeParse(Object.fromEntries(data));
	if (!parsed.success) return bad(parsed.error.issues[0].message, 'mode');
	const draft = await openDraft(db, data, userId);
	if (isFail(draft)) return draft;
	draft.payload.mode = parsed.data.mode;
	await saveDraft(db, draft.id, draft.payload);
	back(draft.id);
}

export async function fixAction(db: DB, request: Request, userId: string) {
	const data = await request.formData();
	const parsed = importFixSchema.safeParse(Object.fromEntries(data));
	if (!parsed.success) return bad(parsed.error.issues[0].message, 'value');
	const draft = await openDraft(db, data, userId);
	if (isFail(draft)) return draft;
	const { kind, row, field, value } = parsed.data;
	const sheet = draft.payload.sheets.find((s) => s.kind === kind);
	if (!sheet || row >= sheet.rows.length || !IMPORT_FIELDS[kind].some((f) => f.key === field)) {
		return bad('That cell is not in the file.', 'value');
	}
	draft.payload.fixes[`${kind}:${row}:${field}`] = value.trim();
	await saveDraft(db, draft.id, draft.payload);
	back(draft.id);
}

export async function skipAction(db: DB, request: Request, userId: string) {
	const data = await request.formData();
	const parsed = importSkipSchema.safeParse(Object.fromEntries(data));
	if (!parsed.success) return bad(parsed.error.issues[0].message);
	const draft = await openDraft(db, data, userId);
	if (isFail(draft)) return draft;
	const key = `${parsed.data.kind}:${parsed.data.row}`;
	const skips = new Set(draft.payload.skips);
	if (parsed.data.skip === '1') skips.add(key);
	else skips.delete(key);
	draft.payload.skips = [...skips];
	await saveDraft(db, draft.id, draft.payload);
	back(draft.id);
}

export async function resolveAction(db: DB, request: Request, userId: string) {
	const data = await request.formData();
	const parsed = importResolveSchema.safeParse(Object.fromEntries(data));
	if (!parsed.success)
		return bad(parsed.error.issues[0].message, String(parsed.error.issues[0].path[0] ?? 'choice'));
	const draft = await openDraft(db, data, userId);
	if (isFail(draft)) return draft;
	const v = parsed.data;
	const key = v.text.toLowerCase();
	if (v.type === 'owner') {
		draft.payload.owners[key] =
			v.choice === 'create'
				? { create: { code: v.code.toUpperCase(), name: v.name } }
				: { customerId: Number(v.choice) };
	} else {
		draft.payload.alloys[key] =
			v.choice === 'create'
				? { create: { code: v.code.toUpperCase(), name: v.name, family: v.family as 'aluminium' } }
				: { alloyId: Number(v.choice) };
	}
	await saveDraft(db, draft.id, draft.payload);
	back(draft.id);
}

/** Dry run: answers with what the commit would do. Commit: starts the write and shows progress. */
export async function commitAction(db: DB, request: Request, userId: string) {
	const data = await request.formData();
	const draft = await openDraft(db, data, userId);
	if (isFail(draft)) return draft;
	if (data.get('dryRun') === '1') {
		const res = await commitImport(db, draft.payload, { userId, dryRun: true });
		if (!res.ok) return bad(res.message, 'commit', 409);
		return { dryRun: res.outcome };
	}
	const started = await startImportJob(db, draft.id, draft.payload, userId);
	if (!started) return bad('This import has already been committed or is running.', 'commit', 409);
	back(draft.id);
}
