import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	circuitSchema,
	coolingCheckSchema,
	inspectionSchema
} from '../../src/lib/schemas/toolroom';
import { findDieConcerns } from '../../src/lib/server/notices/concerns';
import { composeDigest, type DigestEntry } from '../../src/lib/server/notices/digest';
import type { ServicePayload } from '../../src/lib/server/notices/types';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import { addCircuit, recordCheck } from '../../src/lib/server/toolroom/cooling';
import { recordInspection } from '../../src/lib/server/toolroom/inspections';
import { makeUploadDir, setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

const ORIGIN = 'https://castellan.test';
let plant: ToolroomPlant;
let uploads: Awaited<ReturnType<typeof makeUploadDir>>;

function service(taskId: number, taskKind: string, state: ServicePayload['state']): DigestEntry {
	return {
		level: state,
		subject: `T-0001 · ${taskKind} · ${state}`,
		dieNumber: 'T-0001',
		payload: {
			kind: 'service',
			dieNumber: 'T-0001',
			partName: 'Test part T-0001',
			customerName: 'Customer A',
			taskId,
			taskKind,
			state,
			fraction: state === 'overdue' ? 1.2 : 1.0,
			intervalShots: 10_000,
			intervalDays: null,
			shotsRemaining: state === 'overdue' ? -2_000 : 0,
			daysRemaining: null,
			lastDoneAt: '2026-01-05T08:00:00.000Z'
		}
	};
}

beforeAll(async () => {
	plant = await setUpPlant();
	uploads = await makeUploadDir();
	const inspected = await recordInspection(plant.db, {
		dieId: plant.dieId,
		form: inspectionSchema.parse({ half: 'cover', zone: 'Gate side', shotsAt: 11_000, grade: 3 }),
		files: [],
		actor: plant.toolmaker,
		photoStore: uploads.store
	});
	if (!inspected.ok) throw new Error(inspected.message);
	// A grade-2 zone is not named in the mail.
	await recordInspection(plant.db, {
		dieId: plant.dieId,
		form: inspectionSchema.parse({ half: 'ejector', zone: 'Core 1', shotsAt: 11_000, grade: 2 }),
		files: [],
		actor: plant.toolmaker,
		photoStore: uploads.store
	});
	const circuit = await addCircuit(plant.db, {
		dieId: plant.dieId,
		form: circuitSchema.parse({
			half: 'cover',
			label: 'C1',
			coolant: 'water',
			channelDiameterMm: 10,
			nominalFlowLpm: 20
		}),
		actor: plant.lead
	});
	if (!circuit.ok) throw new Error('circuit not added');
	// 14 of 20 L/min = 70 % of nominal: weak (below 80 %).
	const checked = await recordCheck(plant.db, {
		dieId: plant.dieId,
		form: coolingCheckSchema.parse({
			circuitId: circuit.id,
			measuredFlowLpm: 14,
			inletC: 30,
			outletC: 36,
			leakTest: 'pass'
		}),
		actor: plant.toolmaker
	});
	if (!checked.ok) throw new Error(checked.message);
});
afterAll(async () => {
	await uploads.remove();
	await closePhotoPool();
});

describe('the service e-mail, one block per die', () => {
	it('holds the die’s tasks, its grade-3 crack and weak circuit, each linked to its place', async () => {
		const concerns = await findDieConcerns(plant.db, ['T-0001']);
		const mail = composeDigest(
			[service(7, 'stress_relief', 'overdue'), service(8, 'teardown', 'due')],
			{
				origin: ORIGIN,
				asOf: '2026-02-10T06:00:00.000Z',
				concerns
			}
		);
		// One die block, not one line per task.
		expect(mail.text.match(/^- T-0001 /gm)).toHaveLength(1);
		const block = mail.text.slice(mail.text.indexOf('- T-0001 '), mail.text.indexOf('Before any'));
		expect(block).toBe(
			[
				'- T-0001 Test part T-0001 (Customer A)',
				`  ${ORIGIN}/dies/T-0001`,
				'  * Service overdue: Stress relief: 120 % of its interval, 2,000 shots past (last done 2026-01-05)',
				`    Plan task: ${ORIGIN}/dies/T-0001/plan#task-7`,
				`    Open a job for this: ${ORIGIN}/dies/T-0001/jobs?task=7#open-job`,
				'  * Service due: Teardown and overhaul: 100 % of its interval, 0 shots left (last done 2026-01-05)',
				`    Plan task: ${ORIGIN}/dies/T-0001/plan#task-8`,
				`    Open a job for this: ${ORIGIN}/dies/T-0001/jobs?task=8#open-job`,
				'  * Surface grade 3: Cover half, Gate side, at 11,000 shots',
				`    Inspection: ${ORIGIN}/dies/T-0001/surface?zone=Gate%20side`,
				`    Open a job for this: ${ORIGIN}/dies/T-0001/jobs#open-job`,
				'  * Weak cooling circuit C1: 70 % of nominal flow',
				`    Cooling: ${ORIGIN}/dies/T-0001/cooling`,
				`    Open a job for this: ${ORIGIN}/dies/T-0001/jobs#open-job`,
				'',
				''
			].join('\n')
		);
		expect(mail.text).not.toContain('Core 1');
		expect(mail.text).toContain(`Notification settings: ${ORIGIN}/account#notices`);
		expect(mail.html).toContain(`href="${ORIGIN}/account#notices"`);
		expect(mail.html).toContain(`href="${ORIGIN}/dies/T-0001/plan#task-7"`);
		expect(mail.html).toContain(`href="${ORIGIN}/dies/T-0001/surface?zone=Gate%20side"`);
	});
});
