// The die's history: in time order, in words (never an action code such as "surface inspect"),
// with corrections and voids, and entries about a voided record marked as such.
import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import { describeHistoryEntry } from '../../src/lib/history';
import { AUDIT_ACTION_LABELS } from '../../src/lib/labels';
import {
	circuitSchema,
	coolingCheckSchema,
	inspectionSchema
} from '../../src/lib/schemas/toolroom';
import { findDie, getDieStory } from '../../src/lib/server/dies/die-detail';
import { folderPhotoStore } from '../../src/lib/server/photos/folder-store';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import { addCircuit, recordCheck, voidCoolingCheck } from '../../src/lib/server/toolroom/cooling';
import { correctInspection, recordInspection } from '../../src/lib/server/toolroom/inspections';
import { setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

let plant: ToolroomPlant;
beforeEach(async () => {
	plant = await setUpPlant();
});
afterAll(async () => {
	await closePhotoPool();
});

const story = async () => {
	const die = await findDie(plant.db, 'T-0001', { customerId: null });
	return getDieStory(plant.db, die!);
};

describe('die history', () => {
	it('lists checks, inspections, corrections and voids newest first, in words', async () => {
		const circuit = await addCircuit(plant.db, {
			dieId: plant.dieId,
			form: circuitSchema.parse({
				half: 'cover',
				label: 'C1',
				coolant: 'water',
				channelDiameterMm: '10',
				nominalFlowLpm: '20'
			}),
			actor: plant.lead,
			at: '2026-03-01T07:00:00.000Z'
		});
		if (!circuit.ok) throw new Error(circuit.message);
		const check = await recordCheck(plant.db, {
			dieId: plant.dieId,
			form: coolingCheckSchema.parse({
				circuitId: circuit.id,
				measuredFlowLpm: '10',
				inletC: '25',
				outletC: '31',
				leakTest: 'pass'
			}),
			actor: plant.toolmaker,
			at: '2026-03-01T08:00:00.000Z'
		});
		if (!check.ok) throw new Error(check.message);
		const inspection = await recordInspection(plant.db, {
			dieId: plant.dieId,
			form: inspectionSchema.parse({ half: 'ejector', zone: 'Core 1', shotsAt: '1100', grade: 2 }),
			files: [],
			actor: plant.toolmaker,
			photoStore: folderPhotoStore('/nonexistent'),
			at: '2026-03-02T08:00:00.000Z'
		});
		if (!inspection.ok) throw new Error(inspection.message);
		// Recorded later but about an earlier time would still sort by when it was recorded.
		await voidCoolingCheck(plant.db, {
			dieId: plant.dieId,
			checkId: check.id,
			reason: 'Meter not bled',
			actor: plant.lead,
			at: '2026-03-04T08:00:00.000Z'
		});
		await correctInspection(plant.db, {
			dieId: plant.dieId,
			inspectionId: inspection.id,
			values: { shotsAt: 11_000, grade: 2, longestCrackMm: null },
			reason: 'A zero was missing',
			actor: plant.lead,
			at: '2026-03-03T08:00:00.000Z'
		});

		const { history } = await story();
		const recent = history.slice(0, 5).map((h) => [h.at.slice(0, 10), describeHistoryEntry(h)]);
		expect(recent).toEqual([
			['2026-03-04', 'Cooling check of 2026-03-01 voided: Meter not bled'],
			[
				'2026-03-03',
				'Surface inspection corrected: grade 2 at 1,100 shots → grade 2 at 11,000 shots: A zero was missing'
			],
			['2026-03-02', 'Surface inspection, ejector half, Core 1: grade 2 at 1,100 shots'],
			[
				'2026-03-01',
				'Cooling check of C1: 10 L/min, 50 % of nominal — weak; leak test pass — no leak'
			],
			['2026-03-01', 'Cooling circuit C1 added (water, nominal 20 L/min)']
		]);
		// The voided check's own entry and the corrected inspection's entry are marked void.
		expect(history.slice(0, 5).map((h) => h.voidReason)).toEqual([
			null,
			null,
			'Corrected: A zero was missing',
			'Meter not bled',
			null
		]);
	});

	it('never shows an action code', () => {
		for (const action of Object.keys(AUDIT_ACTION_LABELS)) {
			const words = describeHistoryEntry({ action, detail: {} });
			expect(words, action).not.toMatch(/[a-z]+[._][a-z]+/);
			expect(words, action).not.toContain(action.replace('.', ' '));
		}
		expect(describeHistoryEntry({ action: 'something.new', detail: { reason: 'why' } })).toBe(
			'Change recorded: why'
		);
	});
});
