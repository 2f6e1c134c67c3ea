import type SQLite from 'better-sqlite3';
import { rawHandle, type DB } from '../db/connect';
import { writeOpeningBalance } from '../shots/opening-balance';
import { sqliteSession } from '../db/session';
import { analyzeImport, newAlloyLife, type ImportPlan } from './analyze';
import type { ImportOutcome, ImportPayload, ImportPreview } from './types';

export interface CommitOptions {
	dryRun?: boolean;
	now?: string;
	userId: string | null;
	/** Called between chunks of the write with dies written so far and in all. */
	onProgress?: (done: number, total: number) => void;
	/**
	 * A connection of its own for the write (the web app opens one): the app's connection keeps
	 * answering other users from the last committed state while the import writes.
	 */
	raw?: SQLite.Database;
}

export type CommitResult =
	{ ok: true; outcome: ImportOutcome } | { ok: false; message: string; preview?: ImportPreview };

const CHUNK = 250;
const pause = () => new Promise<void>((resolve) => setImmediate(resolve));

function statements(raw: SQLite.Database) {
	return {
		customer: raw.prepare('insert into customers (code, name, created_at) values (?, ?, ?)'),
		alloy: raw.prepare(
			'insert into alloys (code, name, family, expected_life_shots, source_note) values (?, ?, ?, ?, ?)'
		),
		die: raw.prepare(
			`insert into dies (number, part_name, part_number, customer_id, alloy_id, process, cavities,
			   projected_area_cm2, has_slides, location, notes, expected_life_shots, created_at, updated_at)
			 values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`
		),
		half: raw.prepare(
			`insert into die_halves (die_id, side, serial, steel, hardness_hrc, shots, active, installed_at,
			   die_shots_at_install, removed_at, removal_reason)
			 values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`
		),
		templates: raw.prepare(
			'select kind, interval_shots, interval_days from service_templates where family = ?'
		),
		task: raw.prepare(
			`insert into service_tasks (die_id, kind, interval_shots, interval_days, last_done_at, last_done_shots)
			 values (?, ?, ?, ?, ?, ?)`
		),
		findTask: raw.prepare(
			`select id, last_done_at, last_done_shots, interval_shots, interval_days from service_tasks
			  where die_id = ? and kind = ? and active = 1 order by id limit 1`
		),
		setTask: raw.prepare(
			`update service_tasks set last_done_at = ?, last_done_shots = ?, interval_shots = ?,
			   interval_days = ? where id = ?`
		),
		dieId: raw.prepare('select id from dies where number = ?'),
		audit: raw.prepare(
			'insert into audit_log (at, user_id, token_id, action, die_id, detail) values (?, ?, null, ?, ?, ?)'
		)
	};
}

/**
 * Commits an import all-or-nothing: the rows are judged again inside one IMMEDIATE transaction
 * (analyzeImport, the same judgement as the preview) and only a plan with no open problem is
 * written. A dry run does every write and rolls back, so its outcome is the real run's outcome.
 * Writes go in chunks with a pause between them so the server keeps answering while it runs.
 */
export async function commitImport(
	db: DB,
	payload: ImportPayload,
	options: CommitOptions
): Promise<CommitResult> {
	const raw = options.raw ?? rawHandle(db);
	const now = options.now ?? new Date().toISOString();
	const work = async (): Promise<CommitResult> => {
		raw.exec('begin immediate');
		try {
			const { preview, plan } = analyzeImport(raw, payload, now);
			if (!preview.ready) {
				raw.exec('rollback');
				return {
					ok: false,
					message: 'The file still has problems (or nothing to import); nothing was written.',
					preview
				};
			}
			const outcome = await writePlan(db, raw, plan, payload, now, options);
			outcome.unchanged = preview.counts.unchanged;
			// A dry run has done every write the real run does; it takes them back here.
			raw.exec(options.dryRun ? 'rollback' : 'commit');
			return { ok: true, outcome };
		} catch (e) {
			if (raw.inTransaction) raw.exec('rollback');
			throw e;
		}
	};
	// On the app's own handle, hold Kysely's connection lock so no other query lands in the transaction.
	return options.raw ? work() : db.connection().execute(work);
}

async function writePlan(
	db: DB,
	raw: SQLite.Database,
	plan: ImportPlan,
	payload: ImportPayload,
	now: string,
	options: CommitOptions
): Promise<ImportOutcome> {
	const st = statements(raw);
	const userId = options.userId;
	let audits = 0;
	const audit = (action: string, dieId: number | null, detail: unknown) => {
		st.audit.run(now, userId, action, dieId, JSON.stringify(detail));
		audits++;
	};
	const ownerIds = new Map(plan.ownerIds);
	const alloyIds = new Map(plan.alloyIds);
	for (const o of plan.newOwners) {
		const id = Number(
			st.customer.run(o.code.trim().toUpperCase(), o.name.trim(), now).lastInsertRowid
		);
		ownerIds.set(o.key, id);
		audit('customer.create', null, { code: o.code, name: o.name, via: 'import' });
	}
	for (const a of plan.newAlloys) {
		const id = Number(
			st.alloy.run(
				a.code.trim().toUpperCase(),
				a.name.trim(),
				a.family,
				newAlloyLife(a.family),
				'Created by the die import'
			).lastInsertRowid
		);
		alloyIds.set(a.key, id);
		audit('alloy.create', null, { code: a.code, family: a.family, via: 'import' });
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
		const id = Number(
			st.die.run(
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
			).lastInsertRowid
		);
		created.set(f.number, id);
		for (const h of die.halves) {
			const current = h.removedAt === null;
			st.half.run(
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
			);
		}
		if (!templates.has(die.family))
			templates.set(die.family, st.templates.all(die.family) as never);
		for (const t of templates.get(die.family)!) {
			st.task.run(id, t.kind, t.interval_shots, t.interval_days, now, 0);
		}
		// The statements run at once on SQLite, inside the transaction begun above.
		await writeOpeningBalance(sqliteSession(raw, db), {
			dieId: id,
			shots: die.opening,
			at: now,
			userId,
			note
		});
		audit('die.import', id, {
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
			raw
				.prepare(
					`update dies set ${columns.map((c) => `${c} = ?`).join(', ')}, updated_at = ? where id = ?`
				)
				.run(...columns.map((c) => set[c]), now, u.dieId);
		}
		audit('die.import_update', u.dieId, {
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
		const dieId = created.get(t.dieNumber) ?? (st.dieId.get(t.dieNumber) as { id: number }).id;
		const existing = st.findTask.get(dieId, t.kind) as
			| {
					id: number;
					last_done_at: string;
					last_done_shots: number;
					interval_shots: number | null;
					interval_days: number | null;
			  }
			| undefined;
		if (existing) {
			const intervalShots =
				t.intervalShots === undefined ? existing.interval_shots : t.intervalShots;
			const intervalDays = t.intervalDays === undefined ? existing.interval_days : t.intervalDays;
			st.setTask.run(t.lastDoneAt, t.lastDoneShots, intervalShots, intervalDays, existing.id);
			if (!created.has(t.dieNumber)) {
				audit('service.import_update', dieId, {
					kind: t.kind,
					from: { lastDoneAt: existing.last_done_at, lastDoneShots: existing.last_done_shots },
					to: { lastDoneAt: t.lastDoneAt, lastDoneShots: t.lastDoneShots }
				});
			}
		} else {
			st.task.run(
				dieId,
				t.kind,
				t.intervalShots ?? null,
				t.intervalDays ?? null,
				t.lastDoneAt,
				t.lastDoneShots
			);
			audit('service.import_add', dieId, { kind: t.kind, lastDoneAt: t.lastDoneAt });
		}
		tasks++;
	}
	audit('import.commit', null, {
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
