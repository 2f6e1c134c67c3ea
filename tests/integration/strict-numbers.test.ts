// Numbers typed into the real forms (shot form, die form, cooling check) go through the one
// strict parser: what the issue lists — `3.9`, `12abc`, `2e1`, `1e7`, `18,5` — must give the stated
// result, and a refused value must change nothing.
import { beforeEach, describe, expect, it, vi } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { addCircuit } from '../../src/lib/server/toolroom/cooling';
import { setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';
import { fieldErrors, formMessage, postAction, type ActionUser } from './form-action-support';

const current = vi.hoisted(() => ({ db: undefined as unknown }));
vi.mock('$lib/server/db', () => ({ getDb: () => current.db }));

const { actions: shotActions } = await import('../../src/routes/shots/new/+page.server');
const { actions: editActions } = await import('../../src/routes/dies/[number]/edit/+page.server');
const { actions: coolingActions } =
	await import('../../src/routes/dies/[number]/cooling/+page.server');

let plant: ToolroomPlant;
let db: DB;
let lead: ActionUser;

beforeEach(async () => {
	plant = await setUpPlant();
	db = plant.db;
	current.db = db;
	lead = { id: plant.lead.userId, role: 'toolroom_lead' };
	await db
		.insertInto('machines')
		.values({ name: 'CC-84', chamber: 'cold', clamp_force_kn: 8238 })
		.execute();
});

const totalShots = async () =>
	(
		await db
			.selectFrom('dies')
			.select('total_shots')
			.where('id', '=', plant.dieId)
			.executeTakeFirstOrThrow()
	).total_shots;
const ledgerRows = async () =>
	Number(
		(
			await db
				.selectFrom('shot_entries')
				.select((eb) => eb.fn.countAll().as('n'))
				.executeTakeFirstOrThrow()
		).n
	);

describe('shot form: shots are whole numbers, read strictly', () => {
	const post = (shots: string) =>
		postAction(shotActions.default, {
			path: '/shots/new',
			user: lead,
			fields: { die: 'T-0001', machine: 'CC-84', countedAt: '2026-03-01T10:00', shots, note: '' }
		});

	it.each([
		['3.9', '“3.9” is not a whole number.'],
		['12abc', '“12abc” is not a number'],
		['2e1', '“2e1” is written as a power of ten'],
		['1e7', '“1e7” is written as a power of ten'],
		['18,5', '“18,5” is not a whole number.']
	])('%s is refused with a message naming it, and nothing is counted', async (typed, message) => {
		const rowsBefore = await ledgerRows();
		const outcome = await post(typed);
		expect(outcome.kind).toBe('fail');
		expect(fieldErrors(outcome).shots?.[0]).toContain(message);
		expect(await totalShots()).toBe(12_000); // the fixture's count, unchanged
		expect(await ledgerRows()).toBe(rowsBefore);
	});

	it('the typed text comes back in the field so the user sees what was refused', async () => {
		const outcome = await post('12abc');
		const form = (outcome as unknown as { data: { form: { data: { shots: unknown } } } }).data.form;
		expect(form.data.shots).toBe('12abc');
	});

	it('a plain whole number, or one grouped as Castellan prints it, is counted exactly', async () => {
		expect((await post('312')).kind).toBe('redirect');
		expect(await totalShots()).toBe(12_312); // 12 000 + 312
		expect((await post('1,200')).kind).toBe('redirect');
		expect(await totalShots()).toBe(13_512); // 12 312 + 1 200
	});

	it('counter readings are read strictly too', async () => {
		const outcome = await postAction(shotActions.default, {
			path: '/shots/new',
			user: lead,
			fields: {
				die: 'T-0001',
				machine: 'CC-84',
				countedAt: '2026-03-01T10:00',
				shots: '',
				counterStart: '50200',
				counterEnd: '5.0512e4'
			}
		});
		expect(outcome.kind).toBe('fail');
		expect(fieldErrors(outcome).counterEnd?.[0]).toContain('power of ten');
		expect(await totalShots()).toBe(12_000);
	});
});

describe('die form: whole and decimal fields', () => {
	const fields = (over: Record<string, string>) => ({
		number: 'T-0001',
		partName: 'Test part T-0001',
		partNumber: '',
		customerId: String(plant.customerId),
		alloyId: '',
		process: 'cold_chamber',
		cavities: '1',
		projectedAreaCm2: '400',
		location: '',
		notes: '',
		expectedLifeShots: '',
		...over
	});
	const post = async (over: Record<string, string>) => {
		const die = await db
			.selectFrom('dies')
			.select('alloy_id')
			.where('id', '=', plant.dieId)
			.executeTakeFirstOrThrow();
		return postAction(editActions.default, {
			path: '/dies/T-0001/edit',
			user: lead,
			params: { number: 'T-0001' },
			fields: fields({ alloyId: String(die.alloy_id), ...over })
		});
	};
	const stored = () =>
		db
			.selectFrom('dies')
			.select(['cavities', 'projected_area_cm2', 'expected_life_shots'])
			.where('id', '=', plant.dieId)
			.executeTakeFirstOrThrow();

	it.each([
		['expectedLifeShots', '1e7', '“1e7” is written as a power of ten'],
		['expectedLifeShots', '2e1', '“2e1” is written as a power of ten'],
		['expectedLifeShots', '3.9', '“3.9” is not a whole number.'],
		['cavities', '3.9', '“3.9” is not a whole number.'],
		['cavities', '12abc', '“12abc” is not a number'],
		['cavities', '18,5', '“18,5” is not a whole number.'],
		['projectedAreaCm2', '12abc', '“12abc” is not a number'],
		['projectedAreaCm2', '1e7', '“1e7” is written as a power of ten'],
		['projectedAreaCm2', '1,250', '“1,250” could be 1250 or 1.25']
	])('%s = %s is refused and the die is unchanged', async (field, typed, message) => {
		const before = await stored();
		const outcome = await post({ [field]: typed });
		expect(outcome.kind).toBe('fail');
		expect(fieldErrors(outcome)[field]?.[0]).toContain(message);
		expect(await stored()).toEqual(before);
	});

	it('a decimal comma is read as a decimal point: 18,5 cm² is 18.5 cm²', async () => {
		expect((await post({ projectedAreaCm2: '18,5' })).kind).toBe('redirect');
		expect((await stored()).projected_area_cm2).toBe(18.5);
	});

	it('3.9 is a fine projected area, and 10 000 000 written in full is a fine life', async () => {
		expect((await post({ projectedAreaCm2: '3.9', expectedLifeShots: '10 000 000' })).kind).toBe(
			'redirect'
		);
		expect(await stored()).toEqual({
			cavities: 1,
			projected_area_cm2: 3.9,
			expected_life_shots: 10_000_000
		});
	});
});

describe('cooling check form: decimal readings', () => {
	let circuitId: number;
	beforeEach(async () => {
		const added = await addCircuit(db, {
			dieId: plant.dieId,
			form: {
				half: 'cover',
				label: 'C1',
				coolant: 'water',
				channelDiameterMm: 10,
				nominalFlowLpm: 25
			},
			actor: plant.lead
		});
		if (!added.ok) throw new Error(added.message);
		circuitId = added.id;
	});
	const post = (over: Record<string, string>) =>
		postAction(coolingActions.check, {
			path: '/dies/T-0001/cooling?/check',
			user: lead,
			params: { number: 'T-0001' },
			fields: {
				circuitId: String(circuitId),
				measuredFlowLpm: '20',
				inletC: '25',
				outletC: '31',
				supplyPressureBar: '',
				leakTest: 'pass',
				notes: '',
				...over
			}
		});
	const checks = () =>
		db.selectFrom('cooling_checks').select(['measured_flow_lpm', 'inlet_c', 'outlet_c']).execute();

	it('18,5 L/min typed with a decimal comma is stored as 18.5 L/min, 74 % of 25 nominal', async () => {
		const outcome = await post({ measuredFlowLpm: '18,5' });
		expect(outcome.kind).toBe('ok');
		// 18.5 / 25 = 0.74 → 74 % (hand calculation); never 185 L/min = 740 %.
		expect(formMessage(outcome, 'checkForm')).toContain('read as 18.5 L/min');
		expect(formMessage(outcome, 'checkForm')).toContain('74 % of nominal');
		expect(await checks()).toEqual([{ measured_flow_lpm: 18.5, inlet_c: 25, outlet_c: 31 }]);
	});

	it('3.9 is a decimal reading and is kept as 3.9', async () => {
		expect((await post({ inletC: '3.9', outletC: '9,5' })).kind).toBe('ok');
		expect(await checks()).toEqual([{ measured_flow_lpm: 20, inlet_c: 3.9, outlet_c: 9.5 }]);
	});

	it.each([
		['measuredFlowLpm', '12abc', '“12abc” is not a number'],
		['measuredFlowLpm', '2e1', '“2e1” is written as a power of ten'],
		['measuredFlowLpm', '1e7', '“1e7” is written as a power of ten'],
		['outletC', '1,250', '“1,250” could be 1250 or 1.25']
	])('%s = %s is refused and no check is stored', async (field, typed, message) => {
		const outcome = await post({ [field]: typed });
		expect(outcome.kind).toBe('fail');
		expect(fieldErrors(outcome, 'checkForm')[field]?.[0]).toContain(message);
		expect(await checks()).toEqual([]);
	});
});

describe('the order-check API reads its query numbers the same way', async () => {
	const { orderCheckQuerySchema } = await import('../../src/lib/schemas/schedule');
	it('refuses 1e7 parts and 12abc shots per hour, takes a decimal comma for scrap', () => {
		const bad = orderCheckQuerySchema.safeParse({ parts: '1e7', shotsPerHour: '12abc' });
		expect(bad.error?.issues.map((i) => i.message)).toEqual([
			'“1e7” is written as a power of ten; type the number in full digits.',
			'“12abc” is not a number; use digits and one decimal point.'
		]);
		expect(
			orderCheckQuerySchema.parse({ parts: '5000', scrapPct: '2,5', shotsPerHour: '120' })
		).toMatchObject({ parts: 5000, scrapPct: 2.5, shotsPerHour: 120 });
	});
});
