import { beforeEach, describe, expect, it } from 'vitest';
import {
	flowVelocity,
	heatRemovedKw,
	reynoldsNumber,
	reynoldsNumberFor
} from '../../src/lib/calc/cooling';
import { circuitSchema, coolingCheckSchema } from '../../src/lib/schemas/toolroom';
import {
	addCircuit,
	editCircuit,
	getHeatBalance,
	setCoolingLock,
	listCircuits,
	listWeakCircuits,
	recordCheck
} from '../../src/lib/server/toolroom/cooling';
import { setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

let plant: ToolroomPlant;
let water: number;
let oil: number;

beforeEach(async () => {
	plant = await setUpPlant();
	const w = await addCircuit(plant.db, {
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
	const o = await addCircuit(plant.db, {
		dieId: plant.dieId,
		form: circuitSchema.parse({
			half: 'ejector',
			label: 'E1 oil',
			coolant: 'oil',
			channelDiameterMm: 12,
			nominalFlowLpm: 30
		}),
		actor: plant.lead
	});
	if (!w.ok || !o.ok) throw new Error('circuits not added');
	water = w.id;
	oil = o.id;
});

function check(values: Record<string, unknown>, at?: string) {
	return recordCheck(plant.db, {
		dieId: plant.dieId,
		form: coolingCheckSchema.parse({ leakTest: 'pass', ...values }),
		actor: plant.toolmaker,
		at
	});
}

describe('cooling circuits', () => {
	const form = (label: string, nominalFlowLpm = 10) =>
		circuitSchema.parse({
			half: 'cover',
			label,
			coolant: 'water',
			channelDiameterMm: 8,
			nominalFlowLpm
		});

	// Issue 13, item 7: toolmakers add and edit circuits; the lead can lock a die's list.
	it('are added and changed by toolmakers, with one label per die', async () => {
		const added = await addCircuit(plant.db, {
			dieId: plant.dieId,
			form: form('C2 core'),
			actor: plant.toolmaker
		});
		expect(added).toMatchObject({ ok: true });
		expect(
			await addCircuit(plant.db, { dieId: plant.dieId, form: form('C1'), actor: plant.lead })
		).toMatchObject({ ok: false, field: 'label' });
		if (!added.ok) throw new Error(added.message);
		const changed = await editCircuit(plant.db, {
			dieId: plant.dieId,
			circuitId: added.id,
			form: form('C2 core', 14),
			actor: plant.toolmaker
		});
		expect(changed).toEqual({ ok: true, id: added.id });
		// Renaming onto another circuit's label is refused like adding it.
		expect(
			await editCircuit(plant.db, {
				dieId: plant.dieId,
				circuitId: added.id,
				form: form('C1'),
				actor: plant.toolmaker
			})
		).toMatchObject({ ok: false, field: 'label' });
		const { circuits } = await listCircuits(plant.db, plant.dieId);
		expect(circuits.find((c) => c.id === added.id)?.nominal_flow_lpm).toBe(14);
		const audit = await plant.db
			.selectFrom('audit_log')
			.select('action')
			.where('action', 'like', 'cooling.circuit%')
			.execute();
		expect(audit.map((a) => a.action)).toContain('cooling.circuit.edit');
	});

	it('are closed to toolmakers once the lead locks the list, and open again when unlocked', async () => {
		expect(
			await addCircuit(plant.db, { dieId: plant.dieId, form: form('P1'), actor: plant.scheduler })
		).toMatchObject({ ok: false, status: 403 });
		expect(
			await setCoolingLock(plant.db, { dieId: plant.dieId, locked: true, actor: plant.toolmaker })
		).toMatchObject({ ok: false, status: 403 });
		expect(
			await setCoolingLock(plant.db, { dieId: plant.dieId, locked: true, actor: plant.lead })
		).toEqual({ ok: true });
		const refused = await addCircuit(plant.db, {
			dieId: plant.dieId,
			form: form('C3'),
			actor: plant.toolmaker
		});
		expect(refused).toMatchObject({ ok: false, status: 403 });
		expect(
			await editCircuit(plant.db, {
				dieId: plant.dieId,
				circuitId: water,
				form: form('C1', 99),
				actor: plant.toolmaker
			})
		).toMatchObject({ ok: false, status: 403 });
		// Nothing changed.
		const { circuits } = await listCircuits(plant.db, plant.dieId);
		expect(circuits.map((c) => c.label).sort()).toEqual(['C1', 'E1 oil']);
		expect(circuits.find((c) => c.id === water)?.nominal_flow_lpm).toBe(20);
		// The lead still may.
		expect(
			await addCircuit(plant.db, { dieId: plant.dieId, form: form('C3'), actor: plant.lead })
		).toMatchObject({ ok: true });
		await setCoolingLock(plant.db, { dieId: plant.dieId, locked: false, actor: plant.lead });
		expect(
			await addCircuit(plant.db, { dieId: plant.dieId, form: form('C4'), actor: plant.toolmaker })
		).toMatchObject({ ok: true });
	});

	it('cannot be changed through another die', async () => {
		const other = await plant.db
			.selectFrom('dies')
			.select('id')
			.where('id', '!=', plant.dieId)
			.executeTakeFirst();
		expect(other).toBeDefined();
		if (!other) return;
		expect(
			await editCircuit(plant.db, {
				dieId: other.id,
				circuitId: water,
				form: form('C1', 99),
				actor: plant.lead
			})
		).toMatchObject({ ok: false, status: 404 });
	});
});

describe('cooling checks', () => {
	it('flags a water circuit at 70 % of nominal and works out velocity, Reynolds number and heat', async () => {
		const result = await check({ circuitId: water, measuredFlowLpm: 14, inletC: 37, outletC: 43 });
		if (!result.ok) throw new Error(result.message);
		const f = result.figures;
		expect(f.pctOfNominal).toBeCloseTo(70, 10);
		expect(f.weak).toBe(true);
		// Wired to calc/cooling.ts with the mean temperature (40 °C)…
		expect(f.velocityMs).toBe(flowVelocity({ flowLpm: 14, diameterMm: 10 }));
		expect(f.reynolds).toBe(reynoldsNumber({ flowLpm: 14, diameterMm: 10, tempC: 40 }));
		expect(f.heatKw).toBe(heatRemovedKw({ flowLpm: 14, inletC: 37, outletC: 43 }));
		expect(f.regime).toBe('turbulent');
		// …and checked by hand against the London South Bank University water table at 40 °C
		// (ρ 992.2 kg/m³, μ 0.653 mPa·s, c_p 4179 J/(kg·K)): v = 2.971 m/s,
		// Re = 992.2·2.971·0.01/0.000653 ≈ 45 140, Q = 992.2·(14/60 000)·4179·6 ≈ 5.805 kW.
		expect(f.velocityMs).toBeCloseTo(2.971, 3);
		expect(f.reynolds! / 45_142).toBeCloseTo(1, 2);
		expect(f.heatKw! / 5.805).toBeCloseTo(1, 2);

		const { circuits } = await listCircuits(plant.db, plant.dieId);
		expect(circuits.find((c) => c.id === water)?.latest?.figures.weak).toBe(true);
		expect(await listWeakCircuits(plant.db)).toEqual([
			expect.objectContaining({ dieNumber: 'T-0001', label: 'C1', pctOfNominal: 70 })
		]);
	});

	it('uses the oil’s own properties for an oil circuit, never the water tables', async () => {
		const missing = await check({ circuitId: oil, measuredFlowLpm: 27, inletC: 150, outletC: 160 });
		expect(missing).toMatchObject({ ok: false, status: 400, field: 'oilDensityKgM3' });

		const result = await check({
			circuitId: oil,
			measuredFlowLpm: 27,
			inletC: 150,
			outletC: 160,
			oilDensityKgM3: 850,
			oilViscosityMpaS: 5,
			oilSpecificHeatJKgK: 2300
		});
		if (!result.ok) throw new Error(result.message);
		// Re = ρ v d / μ with the oil's figures: 850 · 3.979 · 0.012 / 0.005 ≈ 8117.
		expect(result.figures.reynolds).toBe(
			reynoldsNumberFor({ flowLpm: 27, diameterMm: 12, density: 850, viscosity: 0.005 })
		);
		expect(result.figures.reynolds).toBeCloseTo(8116.9, 0);
		expect(result.figures.reynolds).not.toBeCloseTo(
			reynoldsNumber({ flowLpm: 27, diameterMm: 12, tempC: 155 }),
			0
		);
		// Q = ρ V̇ c_p ΔT = 850 · 0.00045 · 2300 · 10 = 8797.5 W.
		expect(result.figures.heatKw).toBeCloseTo(8.7975, 6);
		expect(result.figures.regime).toBe('turbulent');
		expect(result.figures.weak).toBe(false);
	});

	it('refuses water temperatures outside the tables and a circuit of another die', async () => {
		expect(
			await check({ circuitId: water, measuredFlowLpm: 14, inletC: 150, outletC: 190 })
		).toMatchObject({
			ok: false,
			field: 'outletC'
		});
		const other = await addCircuit(plant.db, {
			dieId: plant.otherDieId,
			form: circuitSchema.parse({
				half: 'cover',
				label: 'X',
				coolant: 'water',
				channelDiameterMm: 8,
				nominalFlowLpm: 10
			}),
			actor: plant.lead
		});
		if (!other.ok) throw new Error(other.message);
		expect(
			await check({ circuitId: other.id, measuredFlowLpm: 9, inletC: 20, outletC: 25 })
		).toMatchObject({
			ok: false,
			status: 404
		});
		expect(await plant.db.selectFrom('cooling_checks').selectAll().execute()).toHaveLength(0);
	});

	it('reports a circuit as weak only by its latest check', async () => {
		await check(
			{ circuitId: water, measuredFlowLpm: 10, inletC: 30, outletC: 35 },
			'2026-03-01T08:00:00.000Z'
		);
		await check(
			{ circuitId: water, measuredFlowLpm: 19, inletC: 30, outletC: 35 },
			'2026-03-05T08:00:00.000Z'
		);
		expect(await listWeakCircuits(plant.db)).toEqual([]);
		await check({
			circuitId: oil,
			measuredFlowLpm: 30,
			inletC: 150,
			outletC: 160,
			oilDensityKgM3: 850,
			oilViscosityMpaS: 5,
			oilSpecificHeatJKgK: 2300,
			leakTest: 'fail'
		});
		expect((await listWeakCircuits(plant.db)).map((c) => [c.label, c.leakTest])).toEqual([
			['E1 oil', 'fail']
		]);
	});
});

describe('die heat balance', () => {
	it('compares the metal’s heat (alloy record) with the latest measured cooling', async () => {
		await check({ circuitId: water, measuredFlowLpm: 14, inletC: 37, outletC: 43 });
		await check({
			circuitId: oil,
			measuredFlowLpm: 27,
			inletC: 150,
			outletC: 160,
			oilDensityKgM3: 850,
			oilViscosityMpaS: 5,
			oilSpecificHeatJKgK: 2300
		});
		const { circuits } = await listCircuits(plant.db, plant.dieId);
		const die = await plant.db
			.selectFrom('dies')
			.selectAll()
			.where('id', '=', plant.dieId)
			.executeTakeFirstOrThrow();
		const view = await getHeatBalance(plant.db, die, circuits, {
			shotMassKg: 2,
			shotsPerHour: 60,
			ejectC: 300,
			latentHeatKjKg: undefined
		});
		// A380 in the alloy record (NADCA A-3-2 figures): c solid 963, c liquid 1 177 (liquid
		// aluminium, NIST-JANAF, from memory), L 389 000, solidus 540, liquidus 595, pour 660 →
		// 2 kg · (1 177·65 + 389 000 + 1 070·55 + 963·240) J
		//   = 2 · (76 505 + 389 000 + 58 850 + 231 120) = 2 · 755 475 J = 1510.95 kJ per shot;
		// at 60 shots an hour 1510.95 · 60 / 3600 = 25.1825 kW against 5.8 + 8.8 kW of cooling.
		expect(view.heatPerShotKj).toBeCloseTo(1510.95, 2);
		expect(view.coolingKw).toBeCloseTo(
			circuits.reduce((s, c) => s + c.latest!.figures.heatKw!, 0),
			10
		);
		expect(view.result?.heatInKw).toBeCloseTo(25.1825, 3);
		expect(view.result?.verdict).toBe('cooling_short');
		expect(view.result?.message).toMatch(/Planning aid only/);
		expect(view.circuitsCounted).toBe(2);
	});

	it('asks for the latent heat when the alloy record has none, and refuses an eject temperature above the solidus', async () => {
		const zinc = await plant.db
			.selectFrom('alloys')
			.select('id')
			.where('code', '=', 'ZP0400')
			.executeTakeFirstOrThrow();
		const die = { id: plant.dieId, alloy_id: zinc.id };
		const query = { shotMassKg: 0.5, shotsPerHour: 300, ejectC: 250, latentHeatKjKg: undefined };
		const without = await getHeatBalance(plant.db, die, [], query);
		expect(without.needsLatentHeat).toBe(true);
		expect(without.error?.field).toBe('latentHeatKjKg');
		expect(without.result).toBeNull();

		const withLatent = await getHeatBalance(plant.db, die, [], { ...query, latentHeatKjKg: 110 });
		// No checked circuit: cooling 0 kW, so the cooling is short whatever the heat.
		expect(withLatent.result?.verdict).toBe('cooling_short');
		expect(withLatent.coolingKw).toBe(0);

		const tooHot = await getHeatBalance(plant.db, die, [], {
			...query,
			ejectC: 400,
			latentHeatKjKg: 110
		});
		expect(tooHot.error).toEqual({ field: 'ejectC', message: expect.stringMatching(/solidus/) });
	});
});

describe('a cooling check under a job', () => {
	it('joins the job, shows on it, and a flushed line offers the plan’s cooling-flush task', async () => {
		const { listJobRecords } = await import('../../src/lib/server/toolroom/job-page');
		const { openPlantJob } = await import('../fixtures/toolroom');
		const jobId = await openPlantJob(plant, { actor: plant.lead });
		const result = await recordCheck(plant.db, {
			dieId: plant.dieId,
			jobId,
			form: coolingCheckSchema.parse({
				leakTest: 'pass',
				circuitId: water,
				measuredFlowLpm: 20,
				inletC: 25,
				outletC: 31,
				flushed: true
			}),
			actor: plant.toolmaker,
			at: '2026-02-04T10:00:00.000Z'
		});
		if (!result.ok) throw new Error(result.message);
		const flush = await plant.db
			.selectFrom('service_tasks')
			.select('id')
			.where('die_id', '=', plant.dieId)
			.where('kind', '=', 'cooling_flush')
			.executeTakeFirstOrThrow();
		// The fixture die stands at 12 000 shots (tests/fixtures/toolroom.ts).
		expect(result.offer).toEqual({
			taskId: flush.id,
			kind: 'cooling_flush',
			label: 'Cooling-line flush',
			doneOn: '2026-02-04',
			shots: 12_000
		});
		const records = await listJobRecords(plant.db, jobId);
		expect(records.coolingChecks.map((k) => [k.measuredFlowLpm, k.flushed])).toEqual([[20, 1]]);

		// A check without a flush offers nothing.
		const plain = await check({ circuitId: water, measuredFlowLpm: 20, inletC: 25, outletC: 31 });
		expect(plain.ok && plain.offer).toBeNull();
	});
});
