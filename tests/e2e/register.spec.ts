import { expect, test } from '@playwright/test';
import { signIn } from './support';

test('a toolroom lead registers a die, sees field errors first, then edits it and holds it', async ({
	page
}, info) => {
	await signIn(page, 'toolroom_lead');
	await page.goto('/dies/new');
	await page.getByLabel('Die number').fill('D-0901');
	await page.getByLabel('Part', { exact: true }).fill('Test bracket');
	await page.getByLabel('Cavities').fill('0');
	await page.getByLabel('Projected area (cm²)').fill('-3');
	await page.getByRole('button', { name: 'Register die' }).click();
	await expect(page.getByText('A die has at least one cavity.')).toBeVisible();
	await expect(page.getByText('The projected area must be greater than 0.')).toBeVisible();
	// What was typed is still there.
	await expect(page.getByLabel('Part', { exact: true })).toHaveValue('Test bracket');

	await page.getByLabel('Owner').selectOption({ label: 'Tollard Hand Tools (TOLLARD)' });
	await page.getByLabel('Alloy').selectOption({ label: 'A380 aluminium' });
	await page.getByLabel('Process').selectOption('cold_chamber');
	await page.getByLabel('Cavities').fill('2');
	await page.getByLabel('Projected area (cm²)').fill('350');
	await page.getByRole('button', { name: 'Register die' }).click();
	await expect(page).toHaveURL(/\/dies\/D-0901$/);
	await expect(page.getByRole('heading', { level: 1, name: 'D-0901' })).toBeVisible();
	await expect(page.getByText('D-0901-C1')).toBeVisible();
	await page.screenshot({ path: info.outputPath('new-die.png'), fullPage: true });

	await page.getByLabel('Move to').selectOption('held');
	await page.getByLabel('Reason').fill('Waiting for the owner’s approval');
	await page.getByRole('button', { name: 'Change state' }).click();
	await expect(
		page.getByText('State Ready → Held: Waiting for the owner’s approval')
	).toBeVisible();
});

test('the register filters, sorts and searches through the URL, with an empty state', async ({
	page
}) => {
	await signIn(page, 'scheduler');
	await page.goto('/dies?family=copper');
	const rows = page.locator('tbody tr');
	await expect(rows).toHaveCount(2);
	await page.goto('/dies?q=no-such-die-anywhere');
	await expect(page.getByText('No die matches these filters.')).toBeVisible();
	await page.goto('/dies?sort=shots&dir=desc&status=active');
	const first = await rows.first().locator('td.num').textContent();
	const second = await rows.nth(1).locator('td.num').textContent();
	const n = (s: string | null) => Number((s ?? '').replace(/\D/g, ''));
	expect(n(first)).toBeGreaterThanOrEqual(n(second));
	const csv = await page.request.get('/dies/export.csv?family=copper');
	expect(csv.headers()['content-type']).toContain('text/csv');
	const text = await csv.text();
	const lines = text.split('\r\n').filter(Boolean);
	expect(lines).toHaveLength(3);
	// The part number is a column of its own, right after the part (issue 15 item 5).
	// (The file starts with a byte-order mark so spreadsheet programs read it as UTF-8.)
	const header = lines[0].replace(/^\uFEFF/, '').split(',');
	expect(header.slice(0, 3)).toEqual(['die', 'part', 'part_number']);
	const [die, , partNumber] = lines[1].split(',');
	expect(partNumber).toMatch(/^[A-Z]{3}-\d+$/);

	// The register shows it, finds the die by it (typed without the dash) and sorts by it.
	await page.goto(`/dies?q=${partNumber.replace('-', '').toLowerCase()}`);
	await expect(rows).toHaveCount(1);
	await expect(rows.first()).toContainText(die);
	await expect(rows.first().locator('td[data-label="Part number"]')).toHaveText(partNumber);
	await page.goto('/dies?sort=partNumber&dir=desc&family=copper');
	const shown = await rows.locator('td[data-label="Part number"]').allTextContents();
	expect(shown.map((s) => s.trim())).toEqual(
		[...shown.map((s) => s.trim())].sort((x, y) => y.localeCompare(x))
	);
	await expect(page.getByRole('columnheader', { name: /Part number/ })).toHaveAttribute(
		'aria-sort',
		'descending'
	);
});
