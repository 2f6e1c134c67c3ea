import { afterAll, afterEach, beforeEach, describe, expect, it } from 'vitest';
import { extractText, getDocumentProxy } from 'unpdf';
import { closeJobSchema, inspectionSchema } from '../../src/lib/schemas/toolroom';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import { recordInspection } from '../../src/lib/server/toolroom/inspections';
import { getJobReport, renderJobReportPdf } from '../../src/lib/server/toolroom/job-report';
import { closeJob, getJob, openJob } from '../../src/lib/server/toolroom/jobs';
import { uploadPhotos } from '../../src/lib/server/toolroom/photos';
import {
	asFile,
	jobForm,
	makeJpeg,
	makeUploadDir,
	setUpPlant,
	type ToolroomPlant
} from '../fixtures/toolroom';

let plant: ToolroomPlant;
let uploads: Awaited<ReturnType<typeof makeUploadDir>>;

beforeEach(async () => {
	plant = await setUpPlant();
	uploads = await makeUploadDir();
});
afterEach(async () => {
	await uploads.remove();
});
afterAll(async () => {
	await closePhotoPool();
});

describe('the job report PDF', () => {
	it('is one page with the die, findings, work done, hours, parts, the inspection and before/after photos', async () => {
		const opened = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm({ description: 'Weld repair of the gate-side crack' }),
			actor: plant.lead,
			at: '2026-02-03T07:00:00.000Z'
		});
		if (!opened.ok) throw new Error(opened.message);
		const open = (await getJob(plant.db, opened.number))!;
		const photo = await makeJpeg(160, 120);
		for (const stage of ['before', 'after'] as const) {
			const up = await uploadPhotos(plant.db, {
				target: { jobId: open.id },
				files: [asFile(photo, `${stage}.jpg`)],
				actor: plant.toolmaker,
				photoStore: uploads.store,
				caption: `Gate side ${stage}`,
				stage
			});
			expect(up.ok).toBe(true);
		}
		const inspected = await recordInspection(plant.db, {
			dieId: plant.dieId,
			jobId: open.id,
			form: inspectionSchema.parse({ half: 'cover', zone: 'Gate side', shotsAt: 12_000, grade: 3 }),
			files: [],
			actor: plant.toolmaker,
			photoStore: uploads.store
		});
		expect(inspected.ok).toBe(true);
		const closed = await closeJob(plant.db, {
			number: opened.number,
			form: closeJobSchema.parse({
				findings: 'Open crack network 14 mm at the gate',
				workDone: 'Ground out, TIG welded, re-polished',
				hours: '3.5',
				partsUsed: 'H13 filler rod'
			}),
			actor: plant.toolmaker,
			at: '2026-02-03T15:00:00.000Z'
		});
		expect(closed.ok).toBe(true);

		const job = (await getJob(plant.db, opened.number))!;
		const pdf = await renderJobReportPdf(
			await getJobReport(plant.db, job, uploads.store),
			'Test Plant'
		);
		const doc = await getDocumentProxy(new Uint8Array(pdf));
		expect(doc.numPages).toBe(1);
		const { text } = await extractText(doc, { mergePages: true });
		for (const expected of [
			`Job report ${opened.number}`,
			'T-0001',
			'Customer A',
			'Open crack network 14 mm at the gate',
			'Ground out, TIG welded, re-polished',
			'3.5 h',
			'H13 filler rod',
			'Gate side: grade 3',
			'Before the work',
			'After the work',
			'Gate side before',
			'Gate side after'
		]) {
			expect(text).toContain(expected);
		}
		// Two photos on the page, one before and one after: two image objects in the file (the
		// dictionaries are plain text; pdf.js's own image extraction needs a newer Node than 20).
		expect(pdf.toString('latin1').match(/\/Subtype \/Image/g)).toHaveLength(2);
	});
});
