import { expect, test } from '@playwright/test';
import { signIn } from './support';

// Uses D-0131 (zinc, hot chamber, 1 cavity, running; no demo bookings far ahead) and HC-20 only.
// In the demo plant, D-0131 on HC-20 fits without warnings two weeks ahead, and its surface
// inspection (every 25 000 shots / 60 days) falls due by about four weeks ahead.

const DAY = 86_400_000;
const dayAhead = (days: number) => new Date(Date.now() + days * DAY).toISOString().slice(0, 10);

test('order check → Book this → the end worked out → saved; then moved by the form into the inspection and warned', async ({
	page
}, info) => {
	await signIn(page, 'scheduler');
	const day = dayAhead(14);
	await page.goto(`/order-check?die=D-0131&parts=1000&scrapPct=2&press=HC-20&from=${day}T06:00`);
	await expect(page.getByTestId('order-verdict')).toHaveAttribute('data-verdict', 'fits');
	await page.getByRole('link', { name: 'Book this' }).click();

	// The form comes filled in from the order check.
	await expect(page).toHaveURL(/\/bookings\/new\?/);
	await expect(page.getByLabel('Die', { exact: true })).toHaveValue('D-0131');
	await expect(page.getByLabel('Press')).toHaveValue('HC-20');
	await expect(page.getByLabel('Good parts ordered')).toHaveValue('1000');
	await expect(page.getByLabel('Expected scrap (%)')).toHaveValue('2');
	await expect(page.getByLabel('Start (plant time)')).toHaveValue(`${day}T06:00`);
	await page.getByLabel('Order reference').fill('E2E-PLANBOOK-1');
	await page.getByRole('button', { name: 'Work out the end' }).click();

	// Worked out by hand: ⌈1 000 ÷ (1 cavity × 0.98)⌉ = 1 021 shots; at zinc's usual 375 shots/h
	// (middle of 300–450, NADCA) = 2.7227 h = 2 h 43 min 22 s; + HC-20's 90 min die change and
	// 60 min preheat (the default for existing presses, common practice) = 5 h 13 min 22 s from
	// 06:00 → 11:13:22, booked to the next whole minute: 11:14.
	const plan = page.getByTestId('booking-plan');
	await expect(plan).toContainText('1,021 shots');
	await expect(plan).toContainText('90 min die change + 60 min preheat');
	await expect(page.getByTestId('worked-out-end')).toContainText(`${day} 11:14`);
	await expect(plan).toHaveAttribute('data-verdict', 'fits');
	await page.screenshot({ path: info.outputPath('worked-out.png'), fullPage: true });
	// Nothing is saved until the run has been read: now the button books.
	await page.getByRole('button', { name: 'Book', exact: true }).click();
	await expect(page).toHaveURL(/\/bookings\/\d+\?booked=1$/);
	await expect(page.getByText('Booked: D-0131 on HC-20 for order E2E-PLANBOOK-1.')).toBeVisible();
	await expect(page.getByText('Worked out', { exact: true })).toBeVisible();

	// Move it by the form four weeks on, where the die's surface inspection falls due.
	await page.getByRole('link', { name: 'Change or move this booking' }).click();
	const later = dayAhead(40);
	await page.getByLabel('Start (plant time)').fill(`${later}T06:00`);
	await page.getByRole('button', { name: 'Work out the end' }).click();
	await expect(page.getByTestId('booking-warnings')).toContainText('Surface inspection');
	await expect(page.getByTestId('booking-plan')).toHaveAttribute('data-verdict', 'warning');
	await expect(page.getByTestId('worked-out-end')).toContainText(`${later} 11:14`);
	await page.screenshot({ path: info.outputPath('move-warned.png'), fullPage: true });
	// A warning needs the planner's confirmation, as for a new booking.
	await page.getByLabel('Save the change anyway — I have read the warnings above').check();
	await page.getByRole('button', { name: 'Save the change anyway' }).click();
	await expect(page).toHaveURL(/\/bookings\/\d+\?moved=1$/);
	const history = page.getByTestId('booking-history');
	await expect(history.getByRole('listitem').filter({ hasText: 'Changed' })).toContainText(
		'Fits → ! Fits with warnings'
	);
	await expect(history).toContainText(`start: ${day} 06:00 → ${later} 06:00`);
});

test('the planner home is short and fits a phone', async ({ page }, info) => {
	await page.setViewportSize({ width: 390, height: 844 });
	await signIn(page, 'scheduler');
	await page.goto('/planner');
	await expect(page.getByRole('heading', { name: 'Blocked bookings' })).toBeVisible();
	await expect(page.getByRole('heading', { name: 'Warnings nobody has confirmed' })).toBeVisible();
	for (const id of ['blocked', 'unconfirmed', 'serviceFirst']) {
		expect(
			await page.getByTestId(`planner-${id}`).getByRole('listitem').count()
		).toBeLessThanOrEqual(5);
	}
	const size = await page.evaluate(() => ({
		scrollWidth: document.documentElement.scrollWidth,
		innerWidth: window.innerWidth
	}));
	expect(size.scrollWidth).toBeLessThanOrEqual(size.innerWidth);
	await page.screenshot({ path: info.outputPath('planner-phone.png'), fullPage: true });
});
