import { beforeEach, describe, expect, it } from 'vitest';
import { openJob } from '../../src/lib/server/toolroom/jobs';
import { findJobOpenedMeanwhile, parseKnownOpenJobs } from '../../src/lib/server/toolroom/resubmit';
import { jobForm, setUpPlant, type ToolroomPlant } from '../fixtures/toolroom';

// Issue 13, item 6: Back, then "Open job" again, goes to the job the first press opened.
let plant: ToolroomPlant;
beforeEach(async () => {
	plant = await setUpPlant();
});

describe('findJobOpenedMeanwhile', () => {
	it('finds the job opened after the form was shown, and nothing the form already listed', async () => {
		// The form was shown with no open job on the die.
		const shownWith = parseKnownOpenJobs('');
		const first = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm(),
			actor: plant.toolmaker
		});
		expect(first).toEqual({ ok: true, number: 'TJ-00001' });
		expect(await findJobOpenedMeanwhile(plant.db, plant.dieId, shownWith)).toBe('TJ-00001');
		// A fresh form lists TJ-00001: a deliberate second job is not caught.
		expect(
			await findJobOpenedMeanwhile(plant.db, plant.dieId, parseKnownOpenJobs('TJ-00001'))
		).toBeNull();
		// Another die's job is not this die's.
		expect(await findJobOpenedMeanwhile(plant.db, plant.otherDieId, shownWith)).toBeNull();
		// A caller that does not say what it showed is never redirected.
		expect(
			await findJobOpenedMeanwhile(plant.db, plant.dieId, parseKnownOpenJobs(null))
		).toBeNull();
	});
});

describe('findRecentTwin', () => {
	it('takes the same person’s same job (kind and words) on the die within 15 minutes as the second press', async () => {
		const { findRecentTwin } = await import('../../src/lib/server/toolroom/resubmit');
		const first = await openJob(plant.db, {
			dieId: plant.dieId,
			form: jobForm(),
			actor: plant.toolmaker,
			at: '2026-03-01T10:00:00.000Z'
		});
		expect(first).toEqual({ ok: true, number: 'TJ-00001' });
		const ask = (
			over: Partial<{
				userId: string;
				kind: string;
				description: string;
				now: string;
				dieId: number;
			}>
		) =>
			findRecentTwin(plant.db, {
				dieId: plant.dieId,
				userId: plant.toolmaker.userId,
				kind: 'repair',
				description: jobForm().description,
				now: '2026-03-01T10:14:00.000Z',
				...over
			});
		// 14 minutes later, same person, same kind, same die: the job the first press opened.
		expect(await ask({})).toBe('TJ-00001');
		// 16 minutes later it is a new request; another person, kind or die is not a twin.
		expect(await ask({ now: '2026-03-01T10:16:00.000Z' })).toBeNull();
		expect(await ask({ userId: plant.lead.userId })).toBeNull();
		expect(await ask({ kind: 'modification' })).toBeNull();
		// Other words are another job, opened on purpose.
		expect(await ask({ description: 'Replace the ejector pins' })).toBeNull();
		expect(await ask({ dieId: plant.otherDieId })).toBeNull();
	});
});
