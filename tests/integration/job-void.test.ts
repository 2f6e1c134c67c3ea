// A toolroom job recorded by mistake can be voided by the toolroom lead with a reason: it stays in
// the die's job history and the audit log, and owner pages leave it out.
import { beforeEach, describe, expect, it } from 'vitest';
import { closeJobSchema } from '../../src/lib/schemas/toolroom';
import { listOwnerJobs } from '../../src/lib/server/owner/die-page';
import { voidJob } from '../../src/lib/server/toolroom/job-void';
import { closeJob, listJobsForDie, openJob } from '../../src/lib/server/toolroom/jobs';
import { jobForm, setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

const closeForm = closeJobSchema.parse({
	findings: 'Nothing found',
	workDone: 'Looked at the gate',
	hours: '0,5',
	partsUsed: '',
	billableToOwner: false,
	ownerSummary: '',
	summaryShared: false
});

let plant: ToolroomPlant;
beforeEach(async () => {
	plant = await setUpPlant();
});

async function doneJob(serviceTaskIds: number[] = []) {
	const opened = await openJob(plant.db, {
		dieId: plant.dieId,
		form: jobForm({ serviceTaskIds }),
		actor: plant.toolmaker,
		at: '2026-02-03T08:00:00.000Z'
	});
	if (!opened.ok) throw new Error(opened.message);
	const closed = await closeJob(plant.db, {
		number: opened.number,
		form: closeForm,
		actor: plant.toolmaker,
		at: '2026-02-03T12:00:00.000Z'
	});
	if (!closed.ok) throw new Error(closed.message);
	return opened.number;
}

describe('voiding a toolroom job', () => {
	it('keeps it in the die history, struck through, and takes it off the owner pages', async () => {
		const number = await doneJob();
		expect((await listOwnerJobs(plant.db, plant.dieId)).map((j) => j.number)).toEqual([number]);
		const result = await voidJob(plant.db, {
			number,
			reason: 'Entered twice by mistake',
			actor: plant.lead,
			at: '2026-02-04T08:00:00.000Z'
		});
		expect(result.ok).toBe(true);
		const history = await listJobsForDie(plant.db, plant.dieId);
		expect(history.map((j) => [j.number, j.voidedAt, j.voidReason])).toEqual([
			[number, '2026-02-04T08:00:00.000Z', 'Entered twice by mistake']
		]);
		expect(await listOwnerJobs(plant.db, plant.dieId)).toEqual([]);
		const audit = await plant.db
			.selectFrom('audit_log')
			.select('detail')
			.where('action', '=', 'job.void')
			.execute();
		expect(audit).toHaveLength(1);
	});

	it('refuses an open job, another role, a short reason and a second void', async () => {
		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm(),
			actor: plant.toolmaker
		});
		if (!opened.ok) throw new Error(opened.message);
		expect(
			await voidJob(plant.db, { number: opened.number, reason: 'by mistake', actor: plant.lead })
		).toMatchObject({ ok: false, status: 409 });
		const number = await doneJob();
		expect(
			await voidJob(plant.db, { number, reason: 'by mistake', actor: plant.toolmaker })
		).toMatchObject({ ok: false, status: 403 });
		expect(await voidJob(plant.db, { number, reason: 'no', actor: plant.lead })).toMatchObject({
			ok: false,
			status: 400
		});
		expect((await voidJob(plant.db, { number, reason: 'by mistake', actor: plant.lead })).ok).toBe(
			true
		);
		expect(
			await voidJob(plant.db, { number, reason: 'by mistake', actor: plant.lead })
		).toMatchObject({ ok: false, status: 409 });
	});

	it('refuses while the job still stands as a service task’s last done', async () => {
		const task = await plant.db
			.selectFrom('service_tasks')
			.select('id')
			.where('die_id', '=', plant.dieId)
			.where('kind', '=', 'surface_inspection')
			.executeTakeFirstOrThrow();
		const number = await doneJob([task.id]);
		const refused = await voidJob(plant.db, { number, reason: 'by mistake', actor: plant.lead });
		expect(refused).toMatchObject({ ok: false, status: 409 });
		expect(!refused.ok && refused.message).toContain('last surface inspection on the service plan');
	});
});
