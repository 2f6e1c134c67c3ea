import { expect, test } from '@playwright/test';
import { signIn } from './support';

// Dies used here and nowhere else: D-0108 (plan journey), D-0110 (label), D-0111 (no-JS form).

test('a toolroom lead makes a task due, marks it done and sees it on track', async ({
	page
}, info) => {
	await signIn(page, 'toolroom_lead');
	await page.goto('/dies/D-0108');
	await page.getByRole('link', { name: 'Service plan', exact: true }).click();
	await expect(page).toHaveURL(/\/dies\/D-0108\/plan$/);
	await expect(page.getByText('Before toolroom work starts')).toBeVisible();

	const card = page.getByRole('article', { name: 'Stress relief' });
	await expect(card.getByText('25–50 °C below the die’s last tempering temperature')).toBeVisible();

	// A calendar interval of one day puts the task (last done weeks ago in the demo) past due.
	await card.getByText('Change intervals').click();
	await card.getByLabel('Every … shots').fill('50');
	await card.getByRole('button', { name: 'Save intervals' }).click();
	await expect(card.getByText('A shot interval below 100 shots is not plausible.')).toBeVisible();
	await card.getByLabel('Every … shots').fill('15000');
	await card.getByLabel('Every … days').fill('1');
	await card.getByRole('button', { name: 'Save intervals' }).click();
	await expect(card.getByText('Stress relief: intervals saved.')).toBeVisible();
	await expect(card.getByText('Overdue', { exact: true })).toBeVisible();

	// Mark done today at the die's current total (the form's defaults).
	await card.getByRole('button', { name: 'Mark done' }).click();
	await expect(card.getByText('Stress relief marked done.')).toBeVisible();
	await expect(card.getByText('On track', { exact: true })).toBeVisible();
	await expect(card.getByText('0 shots · 0 d')).toBeVisible();
	await page.screenshot({ path: info.outputPath('plan-marked-done.png'), fullPage: true });

	// Take the cooling flush off the plan, then put it back with a new interval.
	const flush = page.getByRole('article', { name: 'Cooling-line flush' });
	await flush.getByText('Change intervals').click();
	await flush.getByLabel('Reason to take it off the plan (optional)').fill('Circuit re-drilled');
	await flush.getByRole('button', { name: 'Take off the plan' }).click();
	await expect(page.getByText('Cooling-line flush taken off the plan.')).toBeVisible();
	await expect(flush).toHaveCount(0);
	const add = page.getByRole('form', { name: 'Add a task' });
	await add.getByLabel('Kind').selectOption({ label: 'Cooling-line flush' });
	await add.getByLabel('Every … days').fill('45');
	await add.getByRole('button', { name: 'Add task' }).click();
	await expect(page.getByRole('article', { name: 'Cooling-line flush' })).toContainText('45 days');
	await expect(
		page.getByRole('article', { name: 'Cooling-line flush' }).getByText('On track', { exact: true })
	).toBeVisible();

	// The overview tells the same story.
	await page.getByRole('link', { name: 'Overview', exact: true }).click();
	await expect(page.getByText(/Stress relief done at [\d,]+ shots/)).toBeVisible();
	await expect(
		page.getByText(/Stress relief interval 15,000 shots → 15,000 shots \/ 1 days/)
	).toBeVisible();
	await expect(
		page.getByText('Cooling-line flush taken off the plan: Circuit re-drilled')
	).toBeVisible();
	await page.screenshot({ path: info.outputPath('overview.png'), fullPage: true });
});

test('the fleet life page fits the aluminium dies and explains the families it cannot fit', async ({
	page
}, info) => {
	await signIn(page, 'toolroom_lead');
	await page
		.getByRole('navigation', { name: 'Main' })
		.getByRole('link', { name: 'Fleet life' })
		.click();
	await expect(page.getByRole('heading', { level: 1, name: 'Fleet life' })).toBeVisible();

	// The demo retired five aluminium dies (D-0105, D-0114, D-0123, D-0132, D-0141).
	const aluminium = page.getByTestId('fleet-family-aluminium');
	await expect(aluminium.getByText('Shape β')).toBeVisible();
	await expect(aluminium.getByText('B10 life (shots)')).toBeVisible();
	await expect(
		aluminium.getByRole('img', { name: /Aluminium dies: .*Fitted Weibull curve/ })
	).toBeVisible();
	await expect(aluminium.getByTestId('fleet-no-fit')).toHaveCount(0);
	await expect(aluminium.getByRole('link', { name: 'D-0105' })).toBeVisible();
	await expect(aluminium.getByRole('cell', { name: /%|past expected life/ }).first()).toBeVisible();

	// No zinc die has been retired: plain words, and the data still drawn.
	const zinc = page.getByTestId('fleet-family-zinc');
	await expect(zinc.getByTestId('fleet-no-fit')).toContainText('No zinc die has been retired');
	await expect(zinc.getByRole('img', { name: /Zinc dies: .*No fitted curve/ })).toBeVisible();
	await page.screenshot({ path: info.outputPath('fleet.png'), fullPage: true });
});

test('the die label carries the number and a QR code to the die page', async ({ page }, info) => {
	await signIn(page, 'toolmaker');
	await page.goto('/dies/D-0110');
	await page.getByRole('link', { name: 'Print label' }).click();
	await expect(page).toHaveURL(/\/dies\/D-0110\/label$/);
	const label = page.getByRole('article', { name: 'Die label for D-0110' });
	await expect(label.getByText('D-0110', { exact: true })).toBeVisible();
	const qr = label.getByRole('img', { name: /QR code linking to http.*\/dies\/D-0110$/ });
	await expect(qr).toBeVisible();
	await expect(qr.locator('svg path').first()).toBeAttached();
	// The die page's header and tabs are not on the label page.
	await expect(page.getByRole('navigation', { name: 'Die sections' })).toHaveCount(0);
	await page.screenshot({ path: info.outputPath('label-screen.png') });
	await page.emulateMedia({ media: 'print' });
	await page.screenshot({ path: info.outputPath('label-print.png') });

	// Fleet statistics are for the toolroom lead and the admin only.
	await page.emulateMedia({ media: 'screen' });
	const fleet = await page.goto('/fleet');
	expect(fleet?.status()).toBe(403);
});

test.describe('without JavaScript', () => {
	test.use({ javaScriptEnabled: false });

	test('the plan forms still answer with field errors', async ({ page }) => {
		await signIn(page, 'toolroom_lead');
		await page.goto('/dies/D-0111/plan');
		const card = page.getByRole('article', { name: 'Teardown and overhaul' });
		await card.getByText('Change intervals').click();
		await card.getByLabel('Every … shots').fill('');
		await card.getByLabel('Every … days').fill('');
		await card.getByRole('button', { name: 'Save intervals' }).click();
		const again = page.getByRole('article', { name: 'Teardown and overhaul' });
		await expect(again.getByText('Give an interval in shots, in days, or both.')).toBeVisible();

		// A done date in the future is refused with the reason.
		await again.getByLabel('Done on (plant date)').fill('2099-01-01');
		await again.getByRole('button', { name: 'Mark done' }).click();
		await expect(
			page
				.getByRole('article', { name: 'Teardown and overhaul' })
				.getByText(/cannot be in the future/)
		).toBeVisible();
	});
});
