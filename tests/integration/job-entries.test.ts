// Hours and parts recorded on a toolroom job while it is open (issue 13, "the job as the hub"):
// entries add up to the job's hours, the lead voids a wrong one (audited), closing adds what is
// typed at close, and the job page, the die's job list and the job report PDF say the same.
import { afterAll, afterEach, beforeEach, describe, expect, it } from 'vitest';
import { extractText, getDocumentProxy } from 'unpdf';
import { describeHistoryEntry } from '../../src/lib/history';
import * as createJobEntries from '../../migrations/2026_12_03_2301_create_job_entries';
import {
	closeJobSchema,
	jobRepairSchema,
	partUsedSchema,
	workEntrySchema
} from '../../src/lib/schemas/toolroom';
import { addDieZone, recordJobRepairs } from '../../src/lib/server/toolroom/zones';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import {
	listJobEntries,
	recordPartUsed,
	recordWorkEntry,
	voidJobEntry
} from '../../src/lib/server/toolroom/job-entries';
import { getJobPage } from '../../src/lib/server/toolroom/job-page';
import { getJobReport, renderJobReportPdf } from '../../src/lib/server/toolroom/job-report';
import { closeJob, getJob, listJobsForDie, openJob } from '../../src/lib/server/toolroom/jobs';
import { jobForm, makeUploadDir, setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

let plant: ToolroomPlant;
let uploads: Awaited<ReturnType<typeof makeUploadDir>>;
let number: string;

beforeEach(async () => {
	plant = await setUpPlant();
	uploads = await makeUploadDir();
	const opened = await openJob(plant.db, {
		dieId: plant.dieId,
		form: jobForm({ description: 'Replace broken ejector pins, polish the gate' }),
		actor: plant.lead,
		at: '2026-02-03T07:00:00.000Z'
	});
	if (!opened.ok) throw new Error(opened.message);
	number = opened.number;
});
afterEach(async () => {
	await uploads.remove();
});
afterAll(async () => {
	await closePhotoPool();
});

const work = (hours: string, note?: string) => workEntrySchema.parse({ hours, note });
const part = (name: string, quantity: string) => partUsedSchema.parse({ part: name, quantity });
const close = (hours: string | undefined) =>
	closeJobSchema.parse({
		findings: 'Two ejector pins sheared at the boss',
		workDone: 'Pins replaced, gate polished',
		hours
	});
const jobHours = async () => (await getJob(plant.db, number))!.hours;

async function recordBenchDay() {
	for (const [hours, note, at] of [
		['1.5', 'Pulled the ejector plate', '2026-02-03T08:00:00.000Z'],
		['2,25', 'Fitted new pins', '2026-02-03T11:00:00.000Z']
	] as const) {
		const r = await recordWorkEntry(plant.db, {
			number,
			form: work(hours, note),
			actor: plant.toolmaker,
			at
		});
		expect(r.ok).toBe(true);
	}
	for (const [name, qty] of [
		['Ejector pin 8 × 250', '4'],
		['O-ring 20 × 2', '2']
	] as const) {
		const r = await recordPartUsed(plant.db, {
			number,
			form: part(name, qty),
			actor: plant.toolmaker,
			at: '2026-02-03T11:30:00.000Z'
		});
		expect(r.ok).toBe(true);
	}
}

describe('hours and parts while a job is open', () => {
	it('adds up the hours recorded and lists the parts', async () => {
		await recordBenchDay();
		// By hand: 1.5 h + 2.25 h (typed with a decimal comma) = 3.75 h.
		expect(await jobHours()).toBe(3.75);
		const entries = await listJobEntries(plant.db, (await getJob(plant.db, number))!.id);
		expect(entries.work.map((w) => [w.hours, w.note])).toEqual([
			[1.5, 'Pulled the ejector plate'],
			[2.25, 'Fitted new pins']
		]);
		expect(entries.parts.map((p) => [p.part, p.quantity])).toEqual([
			['Ejector pin 8 × 250', 4],
			['O-ring 20 × 2', 2]
		]);
		// The job stays open: recording is not closing.
		expect((await getJob(plant.db, number))!.status).toBe('open');
	});

	it('keeps the sum to the hundredth of an hour: 0.1 h + 0.2 h is 0.3 h', async () => {
		for (const h of ['0.1', '0.2']) {
			await recordWorkEntry(plant.db, { number, form: work(h), actor: plant.toolmaker });
		}
		expect(await jobHours()).toBe(0.3);
	});

	it('refuses bad input with a field message, and a scheduler, and a closed job', async () => {
		for (const [hours, message] of [
			['0', 'Enter more than 0 hours.'],
			['-1', 'Enter more than 0 hours.'],
			['25', 'One entry covers at most 24 hours; add another for more.'],
			['', 'Enter the hours worked, e.g. 1.5.']
		]) {
			const parsed = workEntrySchema.safeParse({ hours });
			expect(parsed.success, hours).toBe(false);
			expect(parsed.error?.issues[0].message).toBe(message);
		}
		expect(workEntrySchema.safeParse({ hours: '1.5h' }).success).toBe(false);
		expect(partUsedSchema.safeParse({ part: 'Pin', quantity: '0' }).error?.issues[0].message).toBe(
			'Enter a quantity above 0.'
		);
		expect(partUsedSchema.safeParse({ part: '', quantity: '2' }).success).toBe(false);

		const scheduler = await recordWorkEntry(plant.db, {
			number,
			form: work('1'),
			actor: plant.scheduler
		});
		expect(scheduler).toMatchObject({ ok: false, status: 403 });
		expect(await jobHours()).toBeNull();

		await recordWorkEntry(plant.db, { number, form: work('1'), actor: plant.toolmaker });
		expect(
			(await closeJob(plant.db, { number, form: close(undefined), actor: plant.toolmaker })).ok
		).toBe(true);
		const late = await recordPartUsed(plant.db, {
			number,
			form: part('Pin', '1'),
			actor: plant.toolmaker
		});
		expect(late).toMatchObject({ ok: false, status: 409 });
		const id = (await getJob(plant.db, number))!.id;
		expect((await listJobEntries(plant.db, id)).parts).toHaveLength(0);
	});
});

describe('voiding an entry (toolroom lead)', () => {
	it('takes a work entry out of the sum, keeps it struck through, and audits before → after', async () => {
		await recordBenchDay();
		const id = (await getJob(plant.db, number))!.id;
		const [, second] = (await listJobEntries(plant.db, id)).work;

		const byToolmaker = await voidJobEntry(plant.db, {
			number,
			entry: 'work',
			id: second.id,
			reason: 'Entered on the wrong job',
			actor: plant.toolmaker
		});
		expect(byToolmaker).toMatchObject({ ok: false, status: 403 });
		const noReason = await voidJobEntry(plant.db, {
			number,
			entry: 'work',
			id: second.id,
			reason: 'oops',
			actor: plant.lead
		});
		expect(noReason).toMatchObject({ ok: false, field: 'reason' });
		expect(await jobHours()).toBe(3.75);

		const voided = await voidJobEntry(plant.db, {
			number,
			entry: 'work',
			id: second.id,
			reason: 'Entered on the wrong job',
			actor: plant.lead,
			at: '2026-02-03T12:00:00.000Z'
		});
		// By hand: 3.75 h − 2.25 h = 1.5 h.
		expect(voided).toEqual({ ok: true, jobHours: 1.5 });
		expect(await jobHours()).toBe(1.5);
		const after = (await listJobEntries(plant.db, id)).work;
		expect(after).toHaveLength(2);
		expect(after[1]).toMatchObject({ voidReason: 'Entered on the wrong job' });
		expect(after[1].voidedAt).not.toBeNull();

		const again = await voidJobEntry(plant.db, {
			number,
			entry: 'work',
			id: second.id,
			reason: 'Entered on the wrong job',
			actor: plant.lead
		});
		expect(again).toMatchObject({ ok: false, status: 409 });
		// An entry of another kind or job is not found under this job.
		const wrongKind = await voidJobEntry(plant.db, {
			number,
			entry: 'part',
			id: 9999,
			reason: 'Entered on the wrong job',
			actor: plant.lead
		});
		expect(wrongKind).toMatchObject({ ok: false, status: 404 });

		const audit = await plant.db
			.selectFrom('audit_log')
			.select(['action', 'detail'])
			.where('action', '=', 'job.work.void')
			.execute();
		expect(audit).toHaveLength(1);
		const detail = JSON.parse(audit[0].detail);
		expect(detail).toMatchObject({ job: number, before: { hours: 3.75 }, after: { hours: 1.5 } });
		expect(describeHistoryEntry({ action: 'job.work.void', detail })).toBe(
			`Toolroom job ${number}: hours entry voided: Entered on the wrong job`
		);
	});
});

describe('closing sums what was recorded', () => {
	it('adds the hours typed at close to those recorded, and every surface says the same', async () => {
		await recordBenchDay();
		const id = (await getJob(plant.db, number))!.id;
		const [first] = (await listJobEntries(plant.db, id)).parts;
		await voidJobEntry(plant.db, {
			number,
			entry: 'part',
			id: first.id,
			reason: 'Pins came from the spares of T-0002',
			actor: plant.lead
		});
		const closed = await closeJob(plant.db, {
			number,
			form: close('0.5'),
			actor: plant.toolmaker,
			at: '2026-02-03T15:00:00.000Z'
		});
		expect(closed.ok).toBe(true);
		// By hand: 1.5 + 2.25 + 0.5 (typed at close) = 4.25 h.
		const job = (await getJob(plant.db, number))!;
		expect(job.hours).toBe(4.25);
		const page = await getJobPage(plant.db, job, 'toolmaker', '2026-02-03T16:00:00.000Z');
		expect(page.entries.work.map((w) => w.hours)).toEqual([1.5, 2.25, 0.5]);
		const listed = (await listJobsForDie(plant.db, plant.dieId)).find((j) => j.number === number);
		expect(listed?.hours).toBe(4.25);

		const pdf = await renderJobReportPdf(await getJobReport(plant.db, job, uploads.store), 'Plant');
		const { text } = await extractText(await getDocumentProxy(new Uint8Array(pdf)), {
			mergePages: true
		});
		for (const expected of [
			'4.25 h',
			'Hours recorded',
			'1.5 h, Pulled the ejector plate',
			'2.25 h, Fitted new pins',
			'0.5 h, Recorded when the job was closed',
			'2 × O-ring 20 × 2'
		]) {
			expect(text).toContain(expected);
		}
		// The voided part is not on the report.
		expect(text).not.toContain('Ejector pin 8 × 250');
	});

	it('needs hours at close only when none were recorded, and then changes nothing', async () => {
		const refused = await closeJob(plant.db, {
			number,
			form: close(undefined),
			actor: plant.toolmaker
		});
		expect(refused).toMatchObject({ ok: false, status: 400, field: 'hours' });
		const job = (await getJob(plant.db, number))!;
		expect(job.status).toBe('open');
		expect(job.hours).toBeNull();

		await recordWorkEntry(plant.db, { number, form: work('2'), actor: plant.toolmaker });
		const closed = await closeJob(plant.db, {
			number,
			form: close(undefined),
			actor: plant.toolmaker
		});
		expect(closed.ok).toBe(true);
		expect(await jobHours()).toBe(2);
	});
});

describe('upgrading a plant database', () => {
	it('turns the hours of a job closed before entries existed into one entry at its close', async () => {
		await closeJob(plant.db, {
			number,
			form: close('3.5'),
			actor: plant.toolmaker,
			at: '2026-02-03T15:00:00.000Z'
		});
		// The database as it was before this migration: no entry tables, hours on the job row.
		await createJobEntries.down(plant.db);
		await createJobEntries.up(plant.db);
		const id = (await getJob(plant.db, number))!.id;
		const { work: entries } = await listJobEntries(plant.db, id);
		expect(entries.map((w) => [w.hours, w.at])).toEqual([[3.5, '2026-02-03T15:00:00.000Z']]);
		expect(await jobHours()).toBe(3.5);
	});
});

describe('repairs recorded on a job', () => {
	it('are listed on the job page by half and zone, with how they were done', async () => {
		const zone = await addDieZone(
			plant.db,
			plant.dieId,
			{ half: 'cover', name: 'Slide face A' },
			plant.lead
		);
		if (!zone.ok) throw new Error(zone.message);
		const job = (await getJob(plant.db, number))!;
		const recorded = await recordJobRepairs(
			plant.db,
			job.id,
			[{ zoneId: zone.id, kind: 'weld' }],
			plant.toolmaker
		);
		expect(recorded.ok).toBe(true);
		const page = await getJobPage(plant.db, job, 'toolmaker');
		expect(page.zones.map((z) => z.name)).toContain('Slide face A');
		expect(page.repairs.map((r) => [r.half, r.zone, r.kind])).toEqual([
			['cover', 'Slide face A', 'weld']
		]);
		expect(jobRepairSchema.safeParse({ zoneId: '', kind: 'weld' }).error?.issues[0].message).toBe(
			'Choose the zone.'
		);
		expect(jobRepairSchema.safeParse({ zoneId: '3', kind: 'glue' }).success).toBe(false);
	});
});
