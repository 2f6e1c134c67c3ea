import { expect, test } from '@playwright/test';
import { signIn } from './support';

// Read-only: the demo plant runs on Europe/Vienna. Reads the seeded ledger of D-0102 (no entries
// are added to it here) and the settings page; changes nothing, so it cannot disturb other files.

test('pages show plant time and name the zone once', async ({ page }) => {
	await signIn(page, 'admin');
	await page.goto('/settings');
	await expect(page.getByLabel('Plant time zone')).toHaveValue('Europe/Vienna');
	await expect(page.locator('[data-plant-zone]')).toHaveText(
		'Dates and times are plant time (Europe/Vienna).'
	);

	// The demo's daily readings are stored at 21:00 UTC: 22:00 in Vienna in winter (UTC+1),
	// 23:00 in summer (UTC+2) — never 21:00 on the plant's clock.
	await page.goto('/shots?q=D-0102&source=seed');
	const times = await page.locator('tbody tr td:first-child').allInnerTexts();
	const readings = times.filter((t) => /\d{2}:\d{2}$/.test(t.trim()));
	expect(readings.length).toBeGreaterThan(5);
	const clocks = new Set(readings.map((t) => t.trim().slice(-5)));
	clocks.delete('22:00');
	clocks.delete('23:00');
	// Whatever is left is the opening balance, dated when the die was registered (shown in UTC,
	// every reading would be left here at 21:00 besides it).
	expect(clocks.size).toBeLessThanOrEqual(1);
});
