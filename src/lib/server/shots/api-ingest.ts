import { apiShotEntrySchema } from '../../schemas/shots';
import type { DB } from '../db/connect';
import { notePressFeed } from '../schedule/press-feed';
import { nowIso } from '../time';
import {
	isCounterOverlapIssue,
	isKeyConflictIssue,
	isUnknownDieIssue,
	MAX_BATCH,
	normalizeInstant,
	recordShots,
	type LedgerActor,
	type ShotInput,
	type ShotIssue
} from './ledger';

export interface IngestAnswer {
	status: 201 | 400 | 404 | 409;
	body:
		| {
				accepted: number;
				duplicates: number;
				dies: { die: string; totalShots: number }[];
				/** Plausibility warnings; those entries are counted and marked "to review". */
				warnings: { index: number; message: string }[];
		  }
		| {
				error: string;
				issues?: { index: number; field: string; message: string }[];
				original?: ShotIssue['original'];
		  };
}

const plain = (i: ShotIssue) => ({ index: i.index, field: i.field, message: i.message });

/**
 * The body of `POST /api/v1/shots` (already parsed JSON) to a ledger write: one entry object or
 * an array of up to 5000. Every row is checked — shape by the schema, meaning by the ledger — so
 * one answer lists all problems; the batch is applied all-or-nothing. The route and the ingest
 * benchmark both go through here.
 */
export async function ingestShotBody(
	db: DB,
	body: unknown,
	actor: LedgerActor,
	now?: string
): Promise<IngestAnswer> {
	const single = body !== null && typeof body === 'object' && !Array.isArray(body);
	if (!single && !Array.isArray(body)) {
		return {
			status: 400,
			body: {
				error: 'Send one entry object or an array of entries.',
				issues: [{ index: 0, field: 'body', message: 'Expected an object or an array.' }]
			}
		};
	}
	const items: unknown[] = single ? [body] : (body as unknown[]);
	if (items.length === 0) {
		return {
			status: 400,
			body: {
				error: 'The array is empty: nothing to count.',
				issues: [{ index: 0, field: 'batch', message: 'Send at least one entry.' }]
			}
		};
	}
	if (items.length > MAX_BATCH) {
		return {
			status: 400,
			body: {
				error: `Send at most ${MAX_BATCH} entries at once (this batch has ${items.length}); nothing was counted.`,
				issues: [{ index: MAX_BATCH, field: 'batch', message: `At most ${MAX_BATCH} entries.` }]
			}
		};
	}

	const issues: ShotIssue[] = [];
	// Which name the caller gave the press: `press`, or `machine`, its old name still read on input.
	const valid: { index: number; input: ShotInput; pressField: 'press' | 'machine' }[] = [];
	items.forEach((item, index) => {
		const parsed = apiShotEntrySchema.safeParse(item);
		if (!parsed.success) {
			for (const i of parsed.error.issues) {
				const field =
					i.code === 'unrecognized_keys' ? i.keys.join(',') : String(i.path[0] ?? 'entry');
				const message =
					i.code === 'unrecognized_keys'
						? `Unknown field ${i.keys.map((k) => `"${k}"`).join(', ')}; use die, shots, counterStart, counterEnd, countedAt, press, key, resetReason.`
						: i.path.length === 0
							? 'Each entry must be an object.'
							: i.message;
				issues.push({ index, field, message });
			}
			return;
		}
		const e = parsed.data;
		valid.push({
			index,
			pressField: e.press || !e.machine ? 'press' : 'machine',
			input: {
				die: e.die,
				shots:
					e.shots ??
					(e.counterStart != null && e.counterEnd != null ? e.counterEnd - e.counterStart : 0),
				counterStart: e.counterStart ?? null,
				counterEnd: e.counterEnd ?? null,
				countedAt: e.countedAt,
				machine: e.press || e.machine,
				key: e.key,
				resetReason: e.resetReason ?? null
			}
		});
	});

	const inputs = valid.map((v) => v.input);
	// With shape problems nothing is written, but the rest still gets its meaning checked so the
	// caller can fix everything in one go.
	const result = inputs.length
		? await recordShots(db, inputs, actor, {
				source: 'api',
				now,
				dryRun: issues.length > 0,
				onWarning: 'review'
			})
		: null;
	if (result && !result.ok) {
		for (const i of result.issues) {
			const row = valid[i.index];
			// The ledger calls the press `machine` inside; the answer names the field the caller sent.
			const field = i.field === 'machine' ? (row?.pressField ?? 'press') : i.field;
			issues.push({ ...i, field, index: row?.index ?? i.index });
		}
	}
	if (issues.length) {
		issues.sort((a, b) => a.index - b.index);
		if (single && issues.every(isUnknownDieIssue)) {
			return { status: 404, body: { error: issues[0].message } };
		}
		// A single entry whose counter readings are already in the ledger conflicts with it.
		if (single && issues.length === 1 && isKeyConflictIssue(issues[0])) {
			return {
				status: 409,
				body: {
					error: issues[0].message,
					issues: issues.map(plain),
					original: issues[0].original
				}
			};
		}
		if (single && issues.length === 1 && isCounterOverlapIssue(issues[0])) {
			return { status: 409, body: { error: issues[0].message, issues: issues.map(plain) } };
		}
		const rows = new Set(issues.map((i) => i.index)).size;
		return {
			status: 400,
			body: {
				error: single
					? 'The entry has problems; nothing was counted.'
					: `${rows} of ${items.length} entries have problems; nothing was counted.`,
				issues: issues.map(plain)
			}
		};
	}
	if (!result || !result.ok) throw new Error('Unreachable: no issues and no result.');
	const fed = inputs.flatMap((input, i) =>
		result.outcome[i] === 'counted' && input.machine
			? [
					{
						press: input.machine,
						die: input.die,
						counterEnd: input.counterEnd ?? null,
						countedAt: (input.countedAt && normalizeInstant(input.countedAt)) || now || nowIso()
					}
				]
			: []
	);
	await notePressFeed(db, fed, actor.tokenId);
	return {
		status: 201,
		body: {
			accepted: result.accepted,
			duplicates: result.duplicates,
			dies: result.dies,
			warnings: result.warnings
		}
	};
}
