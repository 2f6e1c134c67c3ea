// Unusual cooling readings need a confirmed reason; the toolroom lead can void or correct a check,
// and a voided check stops counting in the die's cooling figures (latest check per circuit, weak
// flags, heat balance) while staying in the list.
import { beforeEach, describe, expect, it } from 'vitest';
import { circuitSchema, coolingCheckSchema } from '../../src/lib/schemas/toolroom';
import {
	addCircuit,
	correctCoolingCheck,
	getHeatBalance,
	listCircuits,
	listWeakCircuits,
	recordCheck,
	voidCoolingCheck
} from '../../src/lib/server/toolroom/cooling';
import { setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

let plant: ToolroomPlant;
let circuitId: number;

beforeEach(async () => {
	plant = await setUpPlant();
	const added = await addCircuit(plant.db, {
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
	if (!added.ok) throw new Error(added.message);
	circuitId = added.id;
});

const reading = (values: Record<string, unknown>) =>
	coolingCheckSchema.parse({
		circuitId,
		leakTest: 'pass',
		measuredFlowLpm: '20',
		inletC: '25',
		outletC: '31',
		...values
	});

const check = (values: Record<string, unknown>, at: string) =>
	recordCheck(plant.db, {
		dieId: plant.dieId,
		form: reading(values),
		actor: plant.toolmaker,
		at
	});

async function figures() {
	const die = await plant.db
		.selectFrom('dies')
		.select(['id', 'alloy_id'])
		.where('id', '=', plant.dieId)
		.executeTakeFirstOrThrow();
	const { circuits, recentChecks } = await listCircuits(plant.db, plant.dieId);
	const balance = await getHeatBalance(plant.db, die, circuits, null);
	return { latest: circuits[0].latest, recentChecks, coolingKw: balance.coolingKw };
}

describe('unusual readings', () => {
	it('an outlet colder than the inlet is not recorded without a reason', async () => {
		const refused = await check({ inletC: '31', outletC: '25' }, '2026-03-01T08:00:00.000Z');
		expect(refused).toMatchObject({ ok: false, status: 400, field: 'unusualReason' });
		expect(!refused.ok && refused.message).toContain('not warmer than the inlet');
		expect((await figures()).recentChecks).toHaveLength(0);

		const confirmed = await check(
			{ inletC: '31', outletC: '25', unusualReason: 'Die on preheat, circuit heating the die' },
			'2026-03-01T08:00:00.000Z'
		);
		expect(confirmed.ok).toBe(true);
		const row = (await figures()).recentChecks[0];
		expect(row.unusual_reason).toBe('Die on preheat, circuit heating the die');
		// A circuit that heats the die removes no heat: the balance counts it as 0, never negative.
		expect((await figures()).coolingKw).toBe(0);
	});

	it('an equal inlet and outlet also needs the reason', async () => {
		const refused = await check({ inletC: '30', outletC: '30' }, '2026-03-01T08:00:00.000Z');
		expect(refused).toMatchObject({ ok: false, field: 'unusualReason' });
	});

	it('flow above 3× nominal (e.g. 185 typed for 18.5 L/min) is not recorded without a reason', async () => {
		// Nominal 20 L/min: 3 × 20 = 60 L/min is the limit; 60 passes, 60.5 does not.
		expect((await check({ measuredFlowLpm: '60' }, '2026-03-01T08:00:00.000Z')).ok).toBe(true);
		const refused = await check({ measuredFlowLpm: '185' }, '2026-03-01T09:00:00.000Z');
		expect(refused).toMatchObject({ ok: false, field: 'unusualReason' });
		expect(!refused.ok && refused.message).toContain('more than 3× the nominal 20 L/min');
		expect((await figures()).recentChecks).toHaveLength(1);
	});
});

describe('voiding a check', () => {
	it('takes it out of the cooling figures but keeps it in the list', async () => {
		// Hand calculation, Q = ρ·V̇·c_p·ΔT with water near 28 °C (ρ ≈ 996 kg/m³, c_p ≈ 4180 J/(kg·K),
		// from memory): 20 L/min, ΔT 6 K → 996 × 20/60000 × 4180 × 6 ≈ 8.33 kW; 10 L/min → ≈ 4.16 kW.
		const good = await check({ measuredFlowLpm: '20' }, '2026-03-01T08:00:00.000Z');
		const wrong = await check({ measuredFlowLpm: '10' }, '2026-03-02T08:00:00.000Z');
		if (!good.ok || !wrong.ok) throw new Error('checks not recorded');

		let now = await figures();
		expect(now.latest?.id).toBe(wrong.id);
		expect(now.coolingKw).toBeCloseTo(4.16, 1);
		// 10 of 20 L/min = 50 %, below the 80 % weak line: flagged.
		expect((await listWeakCircuits(plant.db)).map((c) => c.circuitId)).toEqual([circuitId]);

		const voided = await voidCoolingCheck(plant.db, {
			dieId: plant.dieId,
			checkId: wrong.id,
			reason: 'Flow meter was not bled, reading wrong',
			actor: plant.lead,
			at: '2026-03-02T09:00:00.000Z'
		});
		expect(voided).toEqual({ ok: true, id: wrong.id });

		now = await figures();
		expect(now.latest?.id).toBe(good.id);
		expect(now.coolingKw).toBeCloseTo(8.33, 1);
		expect(await listWeakCircuits(plant.db)).toEqual([]);
		// Still listed, marked void with its reason.
		const listed = now.recentChecks.find((k) => k.id === wrong.id);
		expect(listed?.voided_at).toBe('2026-03-02T09:00:00.000Z');
		expect(listed?.void_reason).toBe('Flow meter was not bled, reading wrong');

		const audit = await plant.db
			.selectFrom('audit_log')
			.select(['action', 'detail'])
			.where('action', '=', 'cooling.void')
			.execute();
		expect(audit).toHaveLength(1);
		expect(audit[0].detail).toContain('Flow meter was not bled');
	});

	it('is for the toolroom lead only, needs a reason, and happens once', async () => {
		const k = await check({}, '2026-03-01T08:00:00.000Z');
		if (!k.ok) throw new Error('not recorded');
		const base = { dieId: plant.dieId, checkId: k.id };
		expect(
			await voidCoolingCheck(plant.db, { ...base, reason: 'wrong circuit', actor: plant.toolmaker })
		).toMatchObject({ ok: false, status: 403 });
		expect(
			await voidCoolingCheck(plant.db, { ...base, reason: 'no', actor: plant.lead })
		).toMatchObject({ ok: false, status: 400, field: 'reason' });
		expect(
			await voidCoolingCheck(plant.db, { ...base, reason: 'wrong circuit', actor: plant.lead })
		).toMatchObject({ ok: true });
		expect(
			await voidCoolingCheck(plant.db, { ...base, reason: 'wrong circuit', actor: plant.lead })
		).toMatchObject({ ok: false, status: 409 });
		// Another die's check is not found through this die.
		expect(
			await voidCoolingCheck(plant.db, {
				dieId: plant.otherDieId,
				checkId: k.id,
				reason: 'wrong circuit',
				actor: plant.lead
			})
		).toMatchObject({ ok: false, status: 404 });
	});
});

describe('correcting a check', () => {
	it('records the right reading at the original time and voids the wrong one', async () => {
		const typo = await check(
			{ measuredFlowLpm: '185', unusualReason: 'checked twice' },
			'2026-03-01T08:00:00.000Z'
		);
		if (!typo.ok) throw new Error('not recorded');
		const { circuitId: _omit, ...form } = reading({ measuredFlowLpm: '18,5' });
		void _omit;
		const corrected = await correctCoolingCheck(plant.db, {
			dieId: plant.dieId,
			checkId: typo.id,
			form,
			reason: 'Decimal comma lost: 18,5 L/min',
			actor: plant.lead,
			at: '2026-03-03T10:00:00.000Z'
		});
		expect(corrected.ok).toBe(true);
		if (!corrected.ok) return;
		// 18.5 of 20 L/min nominal = 92.5 % (hand calculation).
		expect(corrected.figures.pctOfNominal).toBeCloseTo(92.5, 6);
		const now = await figures();
		expect(now.latest).toMatchObject({
			id: corrected.id,
			measured_flow_lpm: 18.5,
			checked_at: '2026-03-01T08:00:00.000Z',
			corrects_id: typo.id
		});
		const old = now.recentChecks.find((k) => k.id === typo.id);
		expect(old?.void_reason).toBe('Corrected: Decimal comma lost: 18,5 L/min');
	});

	it('judges the corrected reading like a new one', async () => {
		const k = await check({}, '2026-03-01T08:00:00.000Z');
		if (!k.ok) throw new Error('not recorded');
		const { circuitId: _omit, ...form } = reading({ inletC: '40', outletC: '20' });
		void _omit;
		const refused = await correctCoolingCheck(plant.db, {
			dieId: plant.dieId,
			checkId: k.id,
			form,
			reason: 'Inlet and outlet were swapped',
			actor: plant.lead
		});
		expect(refused).toMatchObject({ ok: false, field: 'unusualReason' });
		expect((await figures()).latest?.id).toBe(k.id);
	});
});
