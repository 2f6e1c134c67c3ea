import { beforeEach, describe, expect, it } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { createDie } from '../../src/lib/server/dies/die-write';
import { findDie } from '../../src/lib/server/dies/die-detail';
import {
	addServiceTask,
	deactivateServiceTask,
	listServicePlan,
	markTaskDone,
	updateTaskIntervals
} from '../../src/lib/server/dies/service-plan';
import { recordShots } from '../../src/lib/server/shots/ledger';
import {
	taskIntervalsSchema,
	addTaskSchema,
	markDoneSchema
} from '../../src/lib/schemas/service-plan';

const LEAD = 'lead-0001';
const CREATED = '2026-01-05T08:00:00.000Z';
const NOW = '2026-03-10T15:00:00.000Z';

let db: DB;

async function die(number = 'D-0900') {
	const found = await findDie(db, number, { customerId: null });
	if (!found) throw new Error('test die missing');
	return found;
}

async function taskOf(kind: string) {
	const plan = await listServicePlan(db, await die(), 0, NOW);
	const task = plan.tasks.find((t) => t.kind === kind);
	if (!task) throw new Error(`no ${kind} task`);
	return task;
}

async function auditActions() {
	const rows = await db
		.selectFrom('audit_log')
		.select(['action', 'die_id'])
		.orderBy('id')
		.execute();
	return rows.filter((r) => r.action.startsWith('service.'));
}

beforeEach(async () => {
	db = await openTestDatabase();
	await db
		.insertInto('users')
		.values({
			id: LEAD,
			email: 'lead@test',
			name: 'Lead',
			role: 'toolroom_lead',
			password_hash: 'x'
		})
		.execute();
	const customer = await db
		.insertInto('customers')
		.values({ code: 'TESTCO', name: 'Test Castings' })
		.returning('id')
		.executeTakeFirstOrThrow();
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('family', '=', 'aluminium')
		.executeTakeFirstOrThrow();
	const created = await createDie(
		db,
		{
			number: 'D-0900',
			partName: 'Test housing',
			partNumber: '',
			customerId: customer.id,
			alloyId: alloy.id,
			process: 'cold_chamber',
			cavities: 1,
			projectedAreaCm2: 400,
			hasSlides: false,
			location: '',
			notes: '',
			expectedLifeShots: undefined,
			steel: 'H13'
		},
		LEAD,
		CREATED
	);
	expect(created.ok).toBe(true);
	// 16 000 shots spread over February: past the aluminium stress-relief interval (15 000).
	const rows = Array.from({ length: 16 }, (_, i) => ({
		die: 'D-0900',
		shots: 1000,
		countedAt: `2026-02-${String(i + 1).padStart(2, '0')}T22:00:00.000Z`
	}));
	const result = await recordShots(
		db,
		rows,
		{ userId: LEAD, tokenId: null, customerId: null },
		{
			source: 'manual',
			now: NOW
		}
	);
	expect(result.ok).toBe(true);
});

describe('service plan of a die', () => {
	it('starts from the alloy family template with the due state from the die total', async () => {
		const plan = await listServicePlan(db, await die(), 500, NOW);
		expect(plan.tasks.map((t) => t.kind).sort()).toEqual(
			['cooling_flush', 'stress_relief', 'surface_inspection', 'teardown'].sort()
		);
		const relief = plan.tasks.find((t) => t.kind === 'stress_relief')!;
		expect(relief.shotsSinceDone).toBe(16_000);
		expect(relief.state).toBe('due'); // 16 000 / 15 000 = 107 %
		// Already past the interval: projected due is today.
		expect(relief.projectedDue).toBe('2026-03-10');
		// Worst first: the overdue surface inspection (16 000 of 7 500 shots, 64 of 30 days) leads.
		expect(plan.tasks[0].kind).toBe('surface_inspection');
		expect(plan.tasks[0].state).toBe('overdue');
	});

	it('projects the due date from the trailing shot rate', async () => {
		const plan = await listServicePlan(db, await die(), 1000, NOW);
		// Teardown (aluminium template): 40 000 shots or 365 days; 24 000 shots left at 1000 a day
		// → 24 days, before the 301 days left on the calendar.
		const teardown = plan.tasks.find((t) => t.kind === 'teardown')!;
		expect(teardown.projectedDue).toBe('2026-04-03');
		// Idle die: the same task falls due by the calendar only, 365 days after 2026-01-05.
		const idle = await listServicePlan(db, await die(), 0, NOW);
		expect(idle.tasks.find((t) => t.kind === 'teardown')!.projectedDue).toBe('2027-01-05');
	});
});

describe('editing intervals', () => {
	it('rejects a task with neither a shot nor a day interval, with a clear message', () => {
		const parsed = taskIntervalsSchema.safeParse({
			taskId: 1,
			intervalShots: '',
			intervalDays: ''
		});
		expect(parsed.success).toBe(false);
		expect(parsed.error!.issues[0].message).toBe('Give an interval in shots, in days, or both.');
	});

	it('rejects implausible intervals', () => {
		const tiny = taskIntervalsSchema.safeParse({ taskId: 1, intervalShots: '50' });
		expect(tiny.error!.issues[0].message).toMatch(/below 100 shots is not plausible/);
		const huge = taskIntervalsSchema.safeParse({ taskId: 1, intervalShots: '5000000' });
		expect(huge.error!.issues[0].message).toMatch(/above 2 000 000 shots/);
		const days = taskIntervalsSchema.safeParse({ taskId: 1, intervalDays: '4000' });
		expect(days.error!.issues[0].message).toMatch(/5 years/);
		const fraction = taskIntervalsSchema.safeParse({ taskId: 1, intervalShots: '1500.5' });
		// The strict reader names what was typed (src/lib/parse-number.ts).
		expect(fraction.error!.issues[0].message).toBe('“1500.5” is not a whole number.');
		const ok = taskIntervalsSchema.safeParse({
			taskId: 1,
			intervalShots: '20000',
			intervalDays: ''
		});
		expect(ok.success && ok.data).toEqual({
			taskId: 1,
			intervalShots: 20000,
			intervalDays: undefined
		});
	});

	it('saves new intervals, recomputes the state and audits the change', async () => {
		const relief = await taskOf('stress_relief');
		const result = await updateTaskIntervals(
			db,
			await die(),
			{ taskId: relief.id, intervalShots: 20_000, intervalDays: 180 },
			LEAD,
			NOW
		);
		expect(result.ok).toBe(true);
		const after = await taskOf('stress_relief');
		expect(after.intervalShots).toBe(20_000);
		expect(after.intervalDays).toBe(180);
		expect(after.state).toBe('on_track'); // 16 000 / 20 000 = 80 %
		expect(await auditActions()).toEqual([
			{ action: 'service.intervals', die_id: (await die()).id }
		]);
	});

	it('refuses a task of another die and changes nothing', async () => {
		const relief = await taskOf('stress_relief');
		const other = { ...(await die()), id: 9999 };
		const result = await updateTaskIntervals(
			db,
			other,
			{ taskId: relief.id, intervalShots: 500 },
			LEAD,
			NOW
		);
		expect(result).toMatchObject({ ok: false, status: 404 });
		expect((await taskOf('stress_relief')).intervalShots).toBe(15_000);
		expect(await auditActions()).toEqual([]);
	});
});

describe('marking a task done', () => {
	it('resets the task to on track at the current shot count', async () => {
		const relief = await taskOf('stress_relief');
		expect(relief.state).toBe('due');
		const result = await markTaskDone(
			db,
			await die(),
			{ taskId: relief.id, doneOn: '2026-03-10', shots: 16_000 },
			LEAD,
			NOW
		);
		expect(result.ok).toBe(true);
		const after = await taskOf('stress_relief');
		expect(after.state).toBe('on_track');
		expect(after.shotsSinceDone).toBe(0);
		expect(after.lastDoneShots).toBe(16_000);
		expect(after.lastDoneAt).toBe(NOW);
		const audit = await db
			.selectFrom('audit_log')
			.select(['detail'])
			.where('action', '=', 'service.done')
			.executeTakeFirstOrThrow();
		expect(JSON.parse(audit.detail)).toMatchObject({ kind: 'stress_relief', shots: 16_000 });
	});

	it('accepts an earlier date and count, dated midday that day', async () => {
		const relief = await taskOf('stress_relief');
		const result = await markTaskDone(
			db,
			await die(),
			{ taskId: relief.id, doneOn: '2026-02-10', shots: 10_000 },
			LEAD,
			NOW
		);
		expect(result.ok).toBe(true);
		const after = await taskOf('stress_relief');
		expect(after.lastDoneAt).toBe('2026-02-10T12:00:00.000Z');
		expect(after.shotsSinceDone).toBe(6000);
	});

	it('cannot be marked done in the future', async () => {
		const relief = await taskOf('stress_relief');
		const result = await markTaskDone(
			db,
			await die(),
			{ taskId: relief.id, doneOn: '2026-03-11', shots: 16_000 },
			LEAD,
			NOW
		);
		expect(result).toEqual({
			ok: false,
			status: 400,
			field: 'doneOn',
			message: 'The date cannot be in the future (today is 2026-03-10 at the plant, UTC).'
		});
		expect((await taskOf('stress_relief')).state).toBe('due');
		expect(await auditActions()).toEqual([]);
	});

	it('cannot be dated before the previous completion', async () => {
		const relief = await taskOf('stress_relief');
		const result = await markTaskDone(
			db,
			await die(),
			{ taskId: relief.id, doneOn: '2026-01-04', shots: 0 },
			LEAD,
			NOW
		);
		expect(result).toMatchObject({ ok: false, field: 'doneOn' });
		expect(result.ok ? '' : result.message).toMatch(/last done on 2026-01-05/);
	});

	it('refuses a count above the die total', async () => {
		const relief = await taskOf('stress_relief');
		const result = await markTaskDone(
			db,
			await die(),
			{ taskId: relief.id, doneOn: '2026-03-10', shots: 16_001 },
			LEAD,
			NOW
		);
		expect(result).toMatchObject({ ok: false, field: 'shots' });
		expect(result.ok ? '' : result.message).toMatch(/16,000 shots so far/);
		expect((await taskOf('stress_relief')).lastDoneShots).toBe(0);
	});

	it('rejects a malformed or impossible date in the schema', () => {
		expect(markDoneSchema.safeParse({ taskId: 1, doneOn: '10/03/2026', shots: 5 }).success).toBe(
			false
		);
		const feb30 = markDoneSchema.safeParse({ taskId: 1, doneOn: '2026-02-30', shots: 5 });
		expect(feb30.error!.issues[0].message).toBe('That is not a calendar date.');
	});

	it('refuses every change on a retired die', async () => {
		const relief = await taskOf('stress_relief');
		await db.updateTable('dies').set({ status: 'retired' }).execute();
		const result = await markTaskDone(
			db,
			await die(),
			{ taskId: relief.id, doneOn: '2026-03-10', shots: 16_000 },
			LEAD,
			NOW
		);
		expect(result).toMatchObject({ ok: false, status: 409 });
	});
});

describe('adding and deactivating tasks', () => {
	it('takes a task off the plan, then adds that kind again counting from now', async () => {
		const flush = await taskOf('cooling_flush');
		const off = await deactivateServiceTask(
			db,
			await die(),
			flush.id,
			'Circuit plugged for good',
			LEAD,
			NOW
		);
		expect(off.ok).toBe(true);
		let plan = await listServicePlan(db, await die(), 0, NOW);
		expect(plan.tasks.some((t) => t.kind === 'cooling_flush')).toBe(false);
		expect(plan.inactive).toMatchObject([{ id: flush.id, kind: 'cooling_flush' }]);

		const again = await deactivateServiceTask(db, await die(), flush.id, '', LEAD, NOW);
		expect(again).toMatchObject({ ok: false, status: 404 });

		const added = await addServiceTask(
			db,
			await die(),
			{ kind: 'cooling_flush', intervalShots: undefined, intervalDays: 60 },
			LEAD,
			NOW
		);
		expect(added.ok).toBe(true);
		plan = await listServicePlan(db, await die(), 0, NOW);
		const fresh = plan.tasks.find((t) => t.kind === 'cooling_flush')!;
		expect(fresh).toMatchObject({
			intervalShots: null,
			intervalDays: 60,
			lastDoneShots: 16_000,
			shotsSinceDone: 0,
			state: 'on_track',
			projectedDue: '2026-05-09'
		});
		expect((await auditActions()).map((a) => a.action)).toEqual([
			'service.deactivate',
			'service.add'
		]);
	});

	it('refuses a second active task of the same kind', async () => {
		const result = await addServiceTask(
			db,
			await die(),
			{ kind: 'teardown', intervalShots: 40_000, intervalDays: undefined },
			LEAD,
			NOW
		);
		expect(result).toMatchObject({ ok: false, status: 409, field: 'kind' });
		const plan = await listServicePlan(db, await die(), 0, NOW);
		expect(plan.tasks.filter((t) => t.kind === 'teardown')).toHaveLength(1);
	});

	it('accepts only the known kinds', () => {
		expect(addTaskSchema.safeParse({ kind: 'polish', intervalDays: 30 }).success).toBe(false);
		expect(addTaskSchema.safeParse({ kind: 'teardown', intervalDays: '30' }).success).toBe(true);
	});
});
