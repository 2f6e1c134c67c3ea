// The die page's state form asking the owner for a decision, and the owner's answer form, called
// as SvelteKit calls them: bad input gets a field message and changes nothing.
import { beforeEach, describe, expect, it, vi } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';
import { fieldErrors, formMessage, postAction } from './form-action-support';

const current = vi.hoisted(() => ({ db: undefined as unknown }));
vi.mock('$lib/server/db', () => ({ getDb: () => current.db }));

const { actions: dieActions } = await import('../../src/routes/dies/[number]/+page.server');

let plant: ToolroomPlant;
let db: DB;

beforeEach(async () => {
	plant = await setUpPlant();
	db = plant.db;
	current.db = db;
});

const state = async () =>
	(
		await db
			.selectFrom('dies')
			.select('status')
			.where('id', '=', plant.dieId)
			.executeTakeFirstOrThrow()
	).status;
const questions = async () => db.selectFrom('owner_decisions').selectAll().execute();

const hold = (
	fields: Record<string, string>,
	role: 'toolroom_lead' | 'toolmaker' = 'toolroom_lead'
) =>
	postAction(dieActions.status, {
		path: '/dies/T-0001?/status',
		user: { id: role === 'toolroom_lead' ? plant.lead.userId : plant.toolmaker.userId, role },
		params: { number: 'T-0001' },
		fields: {
			status: 'held',
			reason: 'Crack at the gate',
			holdReason: 'owner_decision',
			ownerQuestion: 'Weld repair or a new die?',
			quotedHours: '',
			quotedCost: '',
			...fields
		}
	});

describe("holding a die for the owner's decision", () => {
	it('holds the die and records the question with its quote', async () => {
		const outcome = await hold({ quotedHours: '12,5', quotedCost: '1850' });
		expect(outcome.kind).toBe('ok');
		expect(formMessage(outcome, 'form')).toMatch(/^State changed\./);
		expect(await state()).toBe('held');
		const [q] = await questions();
		// "12,5" is read as 12.5 hours (a lone comma with one digit after it is a decimal mark).
		expect(q).toMatchObject({
			question: 'Weld repair or a new die?',
			quoted_hours: 12.5,
			quoted_cost: 1850
		});
	});

	it.each([
		[{ ownerQuestion: '' }, 'ownerQuestion', 'Say what the owner is asked to decide'],
		[{ quotedHours: '-2' }, 'quotedHours', 'negative'],
		[{ quotedCost: 'lots' }, 'quotedCost', ''],
		[{ status: 'in_toolroom' }, 'holdReason', 'only with moving the die to held'],
		[{ holdReason: 'other' }, 'ownerQuestion', "only with holding the die for the owner's decision"]
	])('refuses %o with a field message and changes nothing', async (fields, field, words) => {
		const outcome = await hold(fields);
		expect(outcome.kind).toBe('fail');
		const errors = fieldErrors(outcome, 'statusForm');
		expect(errors[field]?.join(' ') ?? '').toContain(words);
		expect(errors[field]).toBeTruthy();
		expect(await state()).toBe('ready');
		expect(await questions()).toHaveLength(0);
	});

	it('a toolmaker may not ask the owner', async () => {
		const outcome = await hold({}, 'toolmaker');
		expect(outcome.kind).toBe('fail');
		expect(await questions()).toHaveLength(0);
	});
});
