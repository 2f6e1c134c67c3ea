import { describe, expect, test } from 'vitest';
import { closeJobSchema, openJobSchema } from '../../src/lib/schemas/toolroom';
import { closeJob, openJob } from '../../src/lib/server/toolroom/jobs';
import { announceJobClosed } from '../../src/lib/server/toolroom/announce';
import { setUpPlant } from '../fixtures/toolroom';

describe('closing a toolroom job tells the planners the die is ready again', () => {
	test('one outbox delivery per planner, once, with the die and job named', async () => {
		const plant = await setUpPlant();
		const { db } = plant;
		const opened = await openJob(db, {
			dieId: plant.dieId,
			form: openJobSchema.parse({
				kind: 'repair',
				half: 'cover',
				description: 'Weld a crack at the gate'
			}),
			actor: plant.lead
		});
		if (!opened.ok) throw new Error(opened.message);
		const closed = await closeJob(db, {
			number: opened.number,
			form: closeJobSchema.parse({
				findings: 'Crack 4 mm at the gate',
				workDone: 'Welded and polished',
				hours: 2.5
			}),
			actor: plant.toolmaker
		});
		expect(closed).toMatchObject({ ok: true, dieStatus: 'ready' });

		await announceJobClosed(db, opened.number);
		await announceJobClosed(db, opened.number);
		const rows = await db
			.selectFrom('notice_deliveries')
			.innerJoin('notices', 'notices.id', 'notice_deliveries.notice_id')
			.innerJoin('users', 'users.id', 'notice_deliveries.user_id')
			.select(['users.role', 'notices.kind', 'notices.payload'])
			.execute();
		expect(rows.length).toBeGreaterThan(0);
		expect(rows.every((r) => r.role === 'scheduler')).toBe(true);
		expect(new Set(rows.map((r) => r.kind)).size).toBe(1);
		expect(rows[0].payload).toContain(opened.number);
		const planners = await db
			.selectFrom('users')
			.select('id')
			.where('role', '=', 'scheduler')
			.where('active', '=', 1)
			.execute();
		expect(rows.length).toBe(planners.length);
	});
});
