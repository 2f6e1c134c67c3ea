import { expect, test } from '@playwright/test';
import { signIn } from './support';

// Dies used only by this file: D-0133 (cold chamber, runs on CC-25B) and D-0136 (cold chamber).

/** `YYYY-MM-DDTHH:MM` on the demo plant's clock (Vienna) some minutes before now, as typed. */
const minutesAgo = (m: number) =>
	new Intl.DateTimeFormat('sv-SE', {
		timeZone: 'Europe/Vienna',
		year: 'numeric',
		month: '2-digit',
		day: '2-digit',
		hour: '2-digit',
		minute: '2-digit',
		hourCycle: 'h23'
	})
		.format(new Date(Date.now() - m * 60_000))
		.replace(' ', 'T');

test('a planner enters a run, then the same counter readings again, and is refused with the earlier entry named', async ({
	page
}, info) => {
	await signIn(page, 'scheduler');
	const enter = async (countedAt: string) => {
		await page.goto('/shots/new?die=D-0133');
		await page.getByLabel('Press').selectOption('CC-25B');
		await page.getByLabel('Counted at (plant time)').fill(countedAt);
		await page.getByLabel('Counter at start').fill('50200');
		await page.getByLabel('Counter at end').fill('50512');
		await page.getByRole('button', { name: 'Count shots' }).click();
	};
	const first = minutesAgo(90);
	await enter(first);
	await expect(
		page.getByRole('status').filter({ hasText: 'Counted 312 shots on D-0133' })
	).toBeVisible();
	const total = await page.getByTestId('saved-total').textContent();

	// Same readings, another "counted at": refused beside the counter, naming the first entry.
	await enter(minutesAgo(30));
	const refusal = page.getByText(/Counter 50,200 → 50,512 overlaps the entry of/);
	await expect(refusal).toBeVisible();
	await expect(refusal).toContainText(`${first.replace('T', ' ')} Europe/Vienna`);
	await expect(refusal).toContainText('by Dev Castellanos');
	await expect(refusal).toContainText('on CC-25B (counter 50,200 → 50,512, 312 shots)');
	await page.screenshot({ path: info.outputPath('overlap-refused.png'), fullPage: true });

	// Nothing was counted the second time.
	await page.goto('/shots/new?die=D-0133');
	await expect(page.getByTestId('die-total')).toHaveText(total ?? '');
});

test('the toolroom lead reviews a flagged API entry and confirms it', async ({ browser }, info) => {
	// The planner's session posts through the API: a cold-chamber die on a hot-chamber press.
	const planner = await browser.newPage();
	await signIn(planner, 'scheduler');
	const answer = await planner.request.post('/api/v1/shots', {
		data: { die: 'D-0136', shots: 140, press: 'HC-08', countedAt: new Date().toISOString() }
	});
	expect(answer.status()).toBe(201);
	expect(await answer.json()).toMatchObject({
		accepted: 1,
		warnings: [
			{
				index: 0,
				message: 'Press HC-08 is a hot-chamber press; die D-0136 is made for cold chamber.'
			}
		]
	});
	await planner.close();

	const page = await browser.newPage();
	await signIn(page, 'toolroom_lead');
	await expect(page).toHaveURL(/\/toolroom$/);
	const item = page.getByTestId('review-list').locator('li').filter({ hasText: 'D-0136' });
	await expect(item).toContainText('hot-chamber press');
	await item.getByRole('link', { name: 'D-0136' }).click();
	await expect(page).toHaveURL(/\/dies\/D-0136\/shots\?entry=\d+/);
	await expect(page.getByTestId('to-review')).toContainText('1 ledger entry is to review');

	const form = page.locator('form[action="?/changeEntry"]');
	await expect(form.getByLabel('What to do')).toHaveValue('confirm');
	await form.getByLabel('Reason').fill('Die trial on HC-08 agreed with the shift lead');
	await form.getByRole('button', { name: 'Apply' }).click();
	await expect(page.getByText('Entry confirmed; it leaves the review list.')).toBeVisible();
	await page.screenshot({ path: info.outputPath('entry-confirmed.png'), fullPage: true });

	await page.reload();
	await expect(page.getByTestId('to-review')).toHaveCount(0);
	const row = page.locator('tr').filter({ hasText: 'Die trial on HC-08' });
	await expect(row.getByTestId('entry-state')).toHaveText(/Confirmed/);
	await page.goto('/toolroom');
	await expect(
		page.getByTestId('review-list').locator('li').filter({ hasText: 'D-0136' })
	).toHaveCount(0);
});

test('the halves, entries, press-run and upload pages fit a 390 px phone without sideways scroll', async ({
	page
}) => {
	await page.setViewportSize({ width: 390, height: 844 });
	await signIn(page, 'toolroom_lead');
	// D-0127: the demo die whose cover half was replaced mid-life (read only here). The toolroom
	// home's phone layout belongs to its own spec (its service table is wider than a phone today).
	for (const path of ['/dies/D-0127/shots', '/shots/new?die=D-0127', '/shots/upload']) {
		await page.goto(path);
		const width = await page.evaluate(() => document.documentElement.scrollWidth);
		expect(width, path).toBeLessThanOrEqual(390);
	}
	await page.goto('/dies/D-0127/shots');
	await expect(page.getByRole('cell', { name: 'D-0127-C2' })).toBeVisible();
	await expect(page.getByTestId('old-half-shots-D-0127-C1')).toBeVisible();
});
