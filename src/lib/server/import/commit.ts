import type { DB } from '../db/connect';
import { inWriteTransaction, type SqlSession } from '../db/session';
import { writeOpeningBalance } from '../shots/opening-balance';
import { analyzeImport, newAlloyLife, type ImportPlan } from './analyze';
import type { ImportOutcome, ImportPayload, ImportPreview } from './types';

export interface CommitOptions {
	dryRun?: boolean;
	now?: string;
	userId: string | null;
	/** Called between chunks of the write with dies written so far and in all. */
	onProgress?: (done: number, total: number) => void;
}

export type CommitResult =
	{ ok: true; outcome: ImportOutcome } | { ok: false; message: string; preview?: ImportPreview };

const CHUNK = 250;
const pause = () => new Promise<void>((resolve) => setImmediate(resolve));

// The statements of the write, built once (SQLite caches them prepared by their text).
const SQL = {
	customer: 'insert into customers (code, name, created_at) values (?, ?, ?) returning id',
	alloy: `insert into alloys (code, name, family, expected_life_shots, source_note)
	        values (?, ?, ?, ?, ?) returning id`,
	die: `insert into dies (number, part_name, part_number, customer_id, alloy_id, process, cavities,
	        projected_area_cm2, has_slides, location, notes, expected_life_shots, created_at, updated_at)
	      values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?) returning id`,
	half: `insert into die_halves (die_id, side, serial, steel, hardness_hrc, shots, active, installed_at,
	         die_shots_at_install, removed_at, removal_reason)
	       values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
	templates: 'select kind, interval_shots, interval_days from service_templates where family = ?',
	task: `insert into service_tasks (die_id, kind, interval_shots, interval_days, last_done_at, last_done_shots)
	       values (?, ?, ?, ?, ?, ?)`,
	findTask: `select id, last_done_at, last_done_shots, interval_shots, interval_days from service_tasks
	            where die_id = ? and kind = ? and active = 1 order by id limit 1`,
	setTask: `update service_tasks set last_done_at = ?, last_done_shots = ?, interval_shots = ?,
	            interval_days = ? where id = ?`,
	dieId: 'select id from dies where number = ?',
	audit:
		'insert into audit_log (at, user_id, token_id, action, die_id, detail) values (?, ?, null, ?, ?, ?)'
};

/** The id of the row an `insert … returning id` wrote. */
async function insertedId(s: SqlSession, text: string, params: unknown[]): Promise<number> {
	return Number((await s.get<{ id: number }>(text, params))!.id);
}

/**
 * Commits an import all-or-nothing: the rows are judged again inside one write transaction
 * that holds the import lock from its start (analyzeImport, the same judgement as the preview)
 * and only a plan with no open problem is written. A dry run does every write and rolls back, so its outcome is the real run's outcome.
 * Writes go in chunks with a pause between them so the server keeps answering while it runs.
 */
export async function commitImport(
	db: DB,
	payload: ImportPayload,
	options: CommitOptions
): Promise<CommitResult> {
	const now = options.now ?? new Date().toISOString();
	// A dry run has done every write the real run does; the transaction takes them back.
	return inWriteTransaction(db, { lock: 'import', rollback: options.dryRun }, async (s) => {
		const { preview, plan } = await analyzeImport(s, payload, now);
		if (!preview.ready) {
			return {
				ok: false,
				message: 'The file still has problems (or nothing to import); nothing was written.',
				preview
			};
		}
		const outcome = await writePlan(s, plan, payload, now, options);
		outcome.unchanged = preview.counts.unchanged;
		return { ok: true, outcome };
	});
}

async function writePlan(
	s: SqlSession,
	plan: ImportPlan,
	payload: ImportPayload,
	now: string,
	options: CommitOptions
): Promise<ImportOutcome> {
	const userId = options.userId;
	let audits = 0;
	const audit = async (action: string, dieId: number | null, detail: unknown) => {
		await s.run(SQL.audit, [now, userId, action, dieId, JSON.stringify(detail)]);
		audits++;
	};
	const ownerIds = new Map(plan.ownerIds);
	const alloyIds = new Map(plan.alloyIds);
	for (const o of plan.newOwners) {
		const id = await insertedId(s, SQL.customer, [o.code.trim().toUpperCase(), o.name.trim(), now]);
		ownerIds.set(o.key, id);
		await audit('customer.create', null, { code: o.code, name: o.name, via: 'import' });
	}
	for (const a of plan.newAlloys) {
		const id = await insertedId(s, SQL.alloy, [
			a.code.trim().toUpperCase(),
			a.name.trim(),
			a.family,
			newAlloyLife(a.family),
			'Created by the die import'
		]);
		alloyIds.set(a.key, id);
		await audit('alloy.create', null, { code: a.code, family: a.family, via: 'import' });
	}

	const total = plan.creates.length + plan.updates.length;
	let done = 0;
	const created = new Map<string, number>();
	const templates = new Map<
		string,
		{ kind: string; interval_shots: number | null; interval_days: number | null }[]
	>();
	const note = `Opening balance from the import of ${payload.fileName}`;
	for (const die of plan.creates) {
		const f = die.form;
		const id = await insertedId(s, SQL.die, [
			f.number,
			f.partName,
			f.partNumber || null,
			ownerIds.get(die.ownerKey)!,
			alloyIds.get(die.alloyKey)!,
			f.process,
			f.cavities,
			f.projectedAreaCm2,
			f.hasSlides ? 1 : 0,
			f.location || null,
			f.notes || null,
			f.expectedLifeShots ?? null,
			now,
			now
		]);
		created.set(f.number, id);
		for (const h of die.halves) {
			const current = h.removedAt === null;
			await s.run(SQL.half, [
				id,
				h.side,
				h.serial,
				h.steel,
				h.hardnessHrc,
				current ? 0 : h.shots,
				current ? 1 : 0,
				h.installedAt,
				current ? die.opening - h.shots : 0,
				h.removedAt,
				h.removalReason
			]);
		}
		if (!templates.has(die.family))
			templates.set(die.family, await s.all(SQL.templates, [die.family]));
		for (const t of templates.get(die.family)!) {
			await s.run(SQL.task, [id, t.kind, t.interval_shots, t.interval_days, now, 0]);
		}
		await writeOpeningBalance(s, { dieId: id, shots: die.opening, at: now, userId, note });
		await audit('die.import', id, {
			number: f.number,
			openingShots: die.opening,
			file: payload.fileName
		});
		if (++done % CHUNK === 0) {
			options.onProgress?.(done, total);
			await pause();
		}
	}
	for (const u of plan.updates) {
		const set = { ...u.set };
		if ('__owner' in set) {
			set.customer_id = ownerIds.get(String(set.__owner))!;
			delete set.__owner;
		}
		if ('__alloy' in set) {
			set.alloy_id = alloyIds.get(String(set.__alloy))!;
			delete set.__alloy;
		}
		const columns = Object.keys(set);
		if (columns.length) {
			await s.run(
				`update dies set ${columns.map((c) => `${c} = ?`).join(', ')}, updated_at = ? where id = ?`,
				[...columns.map((c) => set[c]), now, u.dieId]
			);
		}
		await audit('die.import_update', u.dieId, {
			number: u.number,
			changes: u.changes,
			file: payload.fileName
		});
		if (++done % CHUNK === 0) {
			options.onProgress?.(done, total);
			await pause();
		}
	}
	let tasks = 0;
	for (const t of plan.tasks) {
		const dieId =
			created.get(t.dieNumber) ?? (await s.get<{ id: number }>(SQL.dieId, [t.dieNumber]))!.id;
		const existing = await s.get<{
			id: number;
			last_done_at: string;
			last_done_shots: number;
			interval_shots: number | null;
			interval_days: number | null;
		}>(SQL.findTask, [dieId, t.kind]);
		if (existing) {
			const intervalShots =
				t.intervalShots === undefined ? existing.interval_shots : t.intervalShots;
			const intervalDays = t.intervalDays === undefined ? existing.interval_days : t.intervalDays;
			await s.run(SQL.setTask, [
				t.lastDoneAt,
				t.lastDoneShots,
				intervalShots,
				intervalDays,
				existing.id
			]);
			if (!created.has(t.dieNumber)) {
				await audit('service.import_update', dieId, {
					kind: t.kind,
					from: { lastDoneAt: existing.last_done_at, lastDoneShots: existing.last_done_shots },
					to: { lastDoneAt: t.lastDoneAt, lastDoneShots: t.lastDoneShots }
				});
			}
		} else {
			await s.run(SQL.task, [
				dieId,
				t.kind,
				t.intervalShots ?? null,
				t.intervalDays ?? null,
				t.lastDoneAt,
				t.lastDoneShots
			]);
			await audit('service.import_add', dieId, { kind: t.kind, lastDoneAt: t.lastDoneAt });
		}
		// Service rows can be many (five per die and more): let other requests in between chunks too.
		if (++tasks % CHUNK === 0) await pause();
	}
	await audit('import.commit', null, {
		file: payload.fileName,
		mode: payload.mode,
		created: plan.creates.length,
		updated: plan.updates.length,
		tasks
	});
	options.onProgress?.(total, total);
	const outcome: ImportOutcome = {
		dryRun: !!options.dryRun,
		created: plan.creates.map((d) => d.form.number),
		updated: plan.updates.map((u) => u.number),
		unchanged: 0,
		halves: plan.creates.reduce((n, d) => n + d.halves.length, 0),
		tasks,
		openingShots: plan.creates.reduce((n, d) => n + d.opening, 0),
		newOwners: plan.newOwners.map((o) => o.code.toUpperCase()),
		newAlloys: plan.newAlloys.map((a) => a.code.toUpperCase()),
		auditEntries: audits
	};
	return outcome;
}
