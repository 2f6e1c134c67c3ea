import { beforeEach, describe, expect, test } from 'vitest';
import type { DB } from '../../src/lib/server/db/connect';
import { pressFormSchema } from '../../src/lib/schemas/schedule';
import { createBooking } from '../../src/lib/server/schedule/bookings';
import {
	deletePress,
	findPress,
	findPressByName,
	listPresses,
	pressToForm,
	savePress
} from '../../src/lib/server/schedule/presses';
import { actor, draft, NOW, openScheduleDb, PLANNER } from './schedule-support';

let db: DB;
beforeEach(async () => {
	db = await openScheduleDb();
});

const form = (over: Record<string, unknown>) =>
	pressFormSchema.parse({
		name: 'cc-250',
		chamber: 'cold',
		clampForce: 25_000,
		clampUnit: 'kN',
		...over
	});

describe('presses', () => {
	test('a press entered in US units is stored in SI (1 US ton-force = 8.896443 kN, 1 lb = 0.45359237 kg)', async () => {
		const r = await savePress(
			db,
			form({ clampForce: 1000, clampUnit: 'ust', maxShotWeight: 10, tieBarSpacing: 40 }),
			'us',
			PLANNER
		);
		if (!r.ok) throw new Error(r.message);
		const p = (await findPress(db, r.id))!;
		expect(p.name).toBe('CC-250');
		expect(p.clamp_force_kn).toBeCloseTo(8896.4, 1);
		expect(p.max_shot_weight_kg).toBeCloseTo(4.536, 3);
		expect(p.tie_bar_spacing_mm).toBeCloseTo(1016, 1);
		// Shown back in the user's units.
		expect(pressToForm(p, 'us')).toMatchObject({
			clampForce: 1000,
			clampUnit: 'ust',
			maxShotWeight: 10,
			tieBarSpacing: 40
		});
		expect(pressToForm(p, 'metric')).toMatchObject({
			clampForce: 8896.4,
			clampUnit: 'kN',
			maxShotWeight: 4.54
		});
	});

	test('tonnes-force convert at 9.80665 kN', async () => {
		const r = await savePress(db, form({ clampForce: 400, clampUnit: 'tf' }), 'metric', PLANNER);
		if (!r.ok) throw new Error(r.message);
		expect((await findPress(db, r.id))!.clamp_force_kn).toBeCloseTo(3922.7, 1);
	});

	test('names stay unique, whatever the case', async () => {
		expect(await savePress(db, form({ name: 'hc-20' }), 'metric', PLANNER)).toEqual({
			ok: false,
			field: 'name',
			message: 'A press named HC-20 already exists.'
		});
		expect((await findPressByName(db, 'hc-20'))?.name).toBe('HC-20');
	});

	test('editing a press keeps its id and writes the audit trail', async () => {
		const press = (await findPressByName(db, 'CC-40'))!;
		const r = await savePress(
			db,
			form({ name: 'CC-40', clampForce: 4000, status: 'down', notes: 'Tie-bar nut' }),
			'metric',
			PLANNER,
			press.id
		);
		expect(r).toEqual({ ok: true, id: press.id });
		expect(await findPress(db, press.id)).toMatchObject({
			clamp_force_kn: 4000,
			status: 'down',
			notes: 'Tie-bar nut'
		});
		const audit = await db
			.selectFrom('audit_log')
			.select('action')
			.where('action', 'like', 'press.%')
			.execute();
		expect(audit.map((a) => a.action)).toEqual(['press.update']);
	});

	test('a press with bookings cannot be deleted; an unused one can', async () => {
		expect((await createBooking(db, draft(), actor, { confirm: false, now: NOW })).ok).toBe(true);
		const hc20 = (await findPressByName(db, 'HC-20'))!;
		expect(await deletePress(db, hc20.id, PLANNER)).toEqual({
			ok: false,
			message:
				'HC-20 has bookings or counted shots, so it stays on record. Set its status to down instead.'
		});
		const cc160 = (await findPressByName(db, 'CC-160'))!;
		expect(await deletePress(db, cc160.id, PLANNER)).toEqual({ ok: true });
		expect((await listPresses(db, NOW)).map((p) => [p.name, p.upcoming])).toEqual([
			['CC-40', 0],
			['CC-84', 0],
			['HC-20', 1]
		]);
	});

	test('bad press input gets a plain message', () => {
		const bad = pressFormSchema.safeParse({ name: 'x!', chamber: 'warm', clampForce: -5 });
		expect(bad.success).toBe(false);
		const messages = bad.error!.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
		expect(messages).toEqual([
			'name: Use 1–20 capital letters, digits, spaces or dashes, e.g. CC-84.',
			'chamber: Choose hot or cold chamber.',
			'clampForce: The clamping force must be above 0.'
		]);
	});
});
