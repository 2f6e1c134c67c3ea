import { beforeEach, describe, expect, it } from 'vitest';
import { closeJobSchema } from '../../src/lib/schemas/toolroom';
import {
	listClosedJobs,
	listOpenJobs,
	summariseOpenJobs
} from '../../src/lib/server/toolroom/board';
import {
	assignJob,
	cancelJob,
	closeJob,
	getJob,
	listJobsForDie,
	moveJob,
	openJob
} from '../../src/lib/server/toolroom/jobs';
import { jobForm, setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

const closeForm = closeJobSchema.parse({
	findings: 'Open heat-check network at the gate, 6 mm longest crack',
	workDone: 'Ground out, TIG welded, re-polished',
	hours: 3.5,
	partsUsed: 'H13 filler rod',
	billableToOwner: true,
	ownerSummary: 'Gate area repaired; die back in service.',
	summaryShared: true
});

let plant: ToolroomPlant;
beforeEach(async () => {
	plant = await setUpPlant();
});

async function dieStatus() {
	const die = await plant.db
		.selectFrom('dies')
		.select(['status', 'total_shots'])
		.where('id', '=', plant.dieId)
		.executeTakeFirstOrThrow();
	return die.status;
}

async function task(kind: string) {
	return plant.db
		.selectFrom('service_tasks')
		.selectAll()
		.where('die_id', '=', plant.dieId)
		.where('kind', '=', kind)
		.executeTakeFirstOrThrow();
}

async function auditActions() {
	const rows = await plant.db
		.selectFrom('audit_log')
		.select(['action', 'die_id'])
		.where('die_id', '=', plant.dieId)
		.orderBy('id')
		.execute();
	return rows.map((r) => r.action);
}

describe('toolroom job lifecycle', () => {
	it('numbers jobs TJ-00001, TJ-00002 … and takes the die into the toolroom', async () => {
		const first = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm(),
			actor: plant.toolmaker
		});
		const second = await openJob(plant.db, {
			dieId: plant.otherDieId,
			form: jobForm(),
			actor: plant.toolmaker
		});
		expect(first).toEqual({ ok: true, number: 'TJ-00001' });
		expect(second).toEqual({ ok: true, number: 'TJ-00002' });
		expect(await dieStatus()).toBe('in_toolroom');
		const job = await getJob(plant.db, 'tj-00001');
		expect(job?.die_shots_at_open).toBe(12_000);
		expect(job?.status).toBe('open');
		expect(await auditActions()).toEqual(expect.arrayContaining(['job.open', 'die.status']));
	});

	it('opened from a service task, closes with the task done at the die’s current total and the die ready again', async () => {
		const inspection = await task('surface_inspection');
		expect(inspection.last_done_shots).toBe(0);
		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm({ kind: 'surface_inspection', serviceTaskIds: [inspection.id] }),
			actor: plant.toolmaker,
			at: '2026-02-03T07:00:00.000Z'
		});
		if (!opened.ok) throw new Error(opened.message);
		expect((await getJob(plant.db, opened.number))?.source).toBe('service_task');

		expect(
			await moveJob(plant.db, { number: opened.number, to: 'in_progress', actor: plant.toolmaker })
		).toEqual({ ok: true });
		expect(
			await moveJob(plant.db, {
				number: opened.number,
				to: 'waiting_parts',
				actor: plant.toolmaker
			})
		).toEqual({ ok: true });
		expect(
			await moveJob(plant.db, { number: opened.number, to: 'in_progress', actor: plant.toolmaker })
		).toEqual({ ok: true });

		const closed = await closeJob(plant.db, {
			number: opened.number,
			form: closeForm,
			actor: plant.toolmaker,
			at: '2026-02-04T15:00:00.000Z'
		});
		expect(closed).toEqual({ ok: true, dieStatus: 'ready', tasksDone: 1, doneAtShots: 12_000 });
		expect(await dieStatus()).toBe('ready');
		const done = await task('surface_inspection');
		expect(done.last_done_shots).toBe(12_000);
		expect(done.last_done_at).toBe('2026-02-04T15:00:00.000Z');
		// Tasks the job did not carry stay as they were.
		expect((await task('stress_relief')).last_done_shots).toBe(0);

		const job = await getJob(plant.db, opened.number);
		expect(job).toMatchObject({
			status: 'done',
			hours: 3.5,
			billable_to_owner: 1,
			summary_shared: 1,
			die_shots_at_close: 12_000,
			closed_by: plant.toolmaker.userId
		});
		expect(job?.tasks).toEqual([
			expect.objectContaining({ kind: 'surface_inspection', doneAtShots: 12_000 })
		]);
		expect(await auditActions()).toEqual(
			expect.arrayContaining(['job.status', 'service.done', 'job.close'])
		);
	});

	it('keeps the die in the toolroom while another job still holds it', async () => {
		const a = await openJob(plant.db, { dieId: plant.dieId, form: jobForm(), actor: plant.lead });
		const b = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm({ kind: 'modification', half: 'ejector' }),
			actor: plant.lead
		});
		if (!a.ok || !b.ok) throw new Error('open failed');
		await closeJob(plant.db, { number: a.number, form: closeForm, actor: plant.lead });
		expect(await dieStatus()).toBe('in_toolroom');
		await closeJob(plant.db, { number: b.number, form: closeForm, actor: plant.lead });
		expect(await dieStatus()).toBe('ready');
	});

	it('lets only the lead open a job that leaves the die where it is', async () => {
		const refused = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm({ dieToToolroom: false }),
			actor: plant.toolmaker
		});
		expect(refused).toMatchObject({ ok: false, status: 403, field: 'dieToToolroom' });
		expect(await listJobsForDie(plant.db, plant.dieId)).toHaveLength(0);

		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm({ dieToToolroom: false }),
			actor: plant.lead
		});
		expect(opened.ok).toBe(true);
		expect(await dieStatus()).toBe('ready');
	});

	it('refuses a planner, a retired die, another die’s service task and a wrong move', async () => {
		expect(
			await openJob(plant.db, { dieId: plant.dieId, form: jobForm(), actor: plant.scheduler })
		).toMatchObject({ ok: false, status: 403 });

		const otherTask = await plant.db
			.selectFrom('service_tasks')
			.select('id')
			.where('die_id', '=', plant.otherDieId)
			.executeTakeFirstOrThrow();
		expect(
			await openJob(plant.db, {
				dieId: plant.dieId,
				form: jobForm({ serviceTaskIds: [otherTask.id] }),
				actor: plant.toolmaker
			})
		).toMatchObject({ ok: false, status: 400, field: 'serviceTaskIds' });

		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm(),
			actor: plant.toolmaker
		});
		if (!opened.ok) throw new Error(opened.message);
		// Waiting for parts comes after the work started, not straight back to open.
		await moveJob(plant.db, { number: opened.number, to: 'waiting_parts', actor: plant.toolmaker });
		expect(
			await moveJob(plant.db, { number: opened.number, to: 'open', actor: plant.toolmaker })
		).toMatchObject({ ok: false, status: 409 });

		await plant.db
			.updateTable('dies')
			.set({ status: 'retired' })
			.where('id', '=', plant.otherDieId)
			.execute();
		expect(
			await openJob(plant.db, { dieId: plant.otherDieId, form: jobForm(), actor: plant.lead })
		).toMatchObject({ ok: false, status: 409 });
	});

	it('assigns only toolmakers and leads', async () => {
		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm(),
			actor: plant.lead
		});
		if (!opened.ok) throw new Error(opened.message);
		expect(
			await assignJob(plant.db, {
				number: opened.number,
				assignedTo: plant.scheduler.userId,
				actor: plant.lead
			})
		).toMatchObject({ ok: false, field: 'assignedTo' });
		expect(
			await assignJob(plant.db, {
				number: opened.number,
				assignedTo: plant.toolmaker.userId,
				actor: plant.lead
			})
		).toEqual({ ok: true });
		expect((await getJob(plant.db, opened.number))?.assigneeName).toBe('toolmaker');
	});
});

describe('cancelling a job', () => {
	it('is for the lead only, records the reason, marks no task done and frees the die', async () => {
		const stress = await task('stress_relief');
		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm({ kind: 'stress_relief', serviceTaskIds: [stress.id] }),
			actor: plant.toolmaker
		});
		if (!opened.ok) throw new Error(opened.message);

		expect(
			await cancelJob(plant.db, {
				number: opened.number,
				reason: 'Opened twice',
				actor: plant.toolmaker
			})
		).toMatchObject({ ok: false, status: 403 });
		expect((await getJob(plant.db, opened.number))?.status).toBe('open');

		expect(
			await cancelJob(plant.db, {
				number: opened.number,
				reason: 'Opened twice',
				actor: plant.lead
			})
		).toEqual({ ok: true, dieStatus: 'ready' });
		const job = await getJob(plant.db, opened.number);
		expect(job).toMatchObject({ status: 'cancelled', cancel_reason: 'Opened twice' });
		expect((await task('stress_relief')).last_done_shots).toBe(0);
		expect(await dieStatus()).toBe('ready');

		// Final: neither closed nor cancelled again.
		expect(
			await closeJob(plant.db, { number: opened.number, form: closeForm, actor: plant.lead })
		).toMatchObject({ ok: false, status: 409 });
		expect(
			await cancelJob(plant.db, { number: opened.number, reason: 'again', actor: plant.lead })
		).toMatchObject({ ok: false, status: 409 });
	});

	it('leaves a die someone put on hold in the meantime on hold', async () => {
		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm(),
			actor: plant.lead
		});
		if (!opened.ok) throw new Error(opened.message);
		await plant.db
			.updateTable('dies')
			.set({ status: 'held' })
			.where('id', '=', plant.dieId)
			.execute();
		await cancelJob(plant.db, {
			number: opened.number,
			reason: 'Owner decides first',
			actor: plant.lead
		});
		expect(await dieStatus()).toBe('held');
	});
});

describe('the toolroom board', () => {
	it('lists open jobs with their age and closed jobs by page, filtered', async () => {
		const a = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm({ assignedTo: plant.toolmaker.userId }),
			actor: plant.lead,
			at: '2026-03-01T08:00:00.000Z'
		});
		const b = await openJob(plant.db, {
			dieId: plant.otherDieId,
			form: jobForm(),
			actor: plant.lead,
			at: '2026-03-08T08:00:00.000Z'
		});
		if (!a.ok || !b.ok) throw new Error('open failed');
		await moveJob(plant.db, { number: b.number, to: 'in_progress', actor: plant.lead });

		const asOf = '2026-03-11T09:00:00.000Z';
		const open = await listOpenJobs(plant.db, { status: '', toolmaker: '', die: '' }, asOf);
		expect(open.map((j) => [j.number, j.status, j.ageDays])).toEqual([
			['TJ-00001', 'open', 10],
			['TJ-00002', 'in_progress', 3]
		]);
		const mine = await listOpenJobs(
			plant.db,
			{ status: '', toolmaker: plant.toolmaker.userId, die: '' },
			asOf
		);
		expect(mine.map((j) => j.number)).toEqual(['TJ-00001']);
		expect(
			(await listOpenJobs(plant.db, { status: '', toolmaker: '', die: 'T-0002' }, asOf)).map(
				(j) => j.number
			)
		).toEqual(['TJ-00002']);

		const summary = await summariseOpenJobs(plant.db, asOf);
		expect(summary.byStatus).toEqual([
			{ status: 'open', count: 1, oldestDays: 10 },
			{ status: 'in_progress', count: 1, oldestDays: 3 },
			{ status: 'waiting_parts', count: 0, oldestDays: null }
		]);

		await closeJob(plant.db, { number: a.number, form: closeForm, actor: plant.lead });
		const closed = await listClosedJobs(plant.db, { status: '', toolmaker: '', die: '' }, 1);
		expect(closed.total).toBe(1);
		expect(closed.rows[0]).toMatchObject({ number: 'TJ-00001', status: 'done', hours: 3.5 });
		expect(
			(await listClosedJobs(plant.db, { status: 'open', toolmaker: '', die: '' }, 1)).total
		).toBe(0);
	});
});
