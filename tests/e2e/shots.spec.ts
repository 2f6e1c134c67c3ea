import { expect, test, type Page } from '@playwright/test';
import { signIn } from './support';

// Dies used only by this file: D-0113, D-0115, D-0116 (hot chamber), D-0118 (cold chamber).

const shotsOf = (text: string | null) => Number((text ?? '').replace(/[^\d]/g, ''));
/**
 * `YYYY-MM-DD HH:MM` on the demo plant's clock (Europe/Vienna) some minutes before now, as a
 * counter gateway would write it (no offset: read as plant time). Formatted by Intl, not by the
 * app's own helpers.
 */
const minutesAgo = (m: number) =>
	new Date(Date.now() - m * 60_000)
		.toLocaleString('sv-SE', { timeZone: 'Europe/Vienna', hour12: false })
		.slice(0, 16);

async function upload(page: Page, name: string, text: string) {
	await page.getByLabel('CSV file').setInputFiles({
		name,
		mimeType: 'text/csv',
		buffer: Buffer.from(text, 'utf8')
	});
	await page.getByRole('button', { name: 'Check the file' }).click();
}

test('a scheduler records a press run and sees the new total', async ({ page }, info) => {
	await signIn(page, 'scheduler');
	await page.goto('/shots/new');
	await page.getByRole('combobox', { name: 'Die' }).fill('d-0115');
	await page.getByRole('button', { name: 'Look up' }).click();
	const total = page.getByTestId('die-total');
	await expect(total).toBeVisible();
	const before = shotsOf(await total.textContent());
	expect(before).toBeGreaterThan(0);

	await page.getByLabel('Press').selectOption('HC-20');
	await page.getByLabel('Shots', { exact: true }).fill('240');
	await expect(
		page.getByText(`After saving: ${(before + 240).toLocaleString('en-GB')} shots`)
	).toBeVisible();
	await page.getByRole('button', { name: 'Count shots' }).click();

	const saved = page.getByRole('status').filter({ hasText: 'Counted 240 shots on D-0115' });
	await expect(saved).toBeVisible();
	expect(shotsOf(await page.getByTestId('saved-total').textContent())).toBe(before + 240);
	await expect(page.getByTestId('die-total')).toHaveText((before + 240).toLocaleString('en-GB'));
	await page.screenshot({ path: info.outputPath('press-run-saved.png'), fullPage: true });

	// The die page agrees, and the entry is at the top of its ledger.
	await saved.getByRole('link', { name: "See the die's shots" }).click();
	await expect(page).toHaveURL(/\/dies\/D-0115\/shots$/);
	await expect(page.getByText((before + 240).toLocaleString('en-GB')).first()).toBeVisible();
	const newest = page
		.getByRole('table')
		.filter({ hasText: 'Counted' })
		.last()
		.locator('tbody tr')
		.first();
	await expect(newest).toContainText('240');
	await expect(newest).toContainText('Press-run form');
});

test('the press-run form answers a typing error beside the field and counts nothing', async ({
	page
}) => {
	await signIn(page, 'scheduler');
	await page.goto('/shots/new?die=D-0115');
	const before = shotsOf(await page.getByTestId('die-total').textContent());
	await page.getByLabel('Press').selectOption('HC-20');
	await page.getByLabel('Counter at start').fill('5000');
	await page.getByLabel('Counter at end').fill('4000');
	await page.getByRole('button', { name: 'Count shots' }).click();
	await expect(page.getByText('The counter end is below the counter start.')).toBeVisible();
	await page.goto('/shots/new?die=D-0115');
	expect(shotsOf(await page.getByTestId('die-total').textContent())).toBe(before);
});

test('a toolroom lead uploads a CSV with a bad row, fixes it and commits; a second upload counts nothing', async ({
	page
}, info) => {
	await signIn(page, 'toolroom_lead');
	await page.goto('/shots/upload');
	const rows = [
		['D-0116', minutesAgo(50), '120', 'HC-42M'],
		['D-0113', minutesAgo(40), '90', 'HC-08'],
		['D-0116', minutesAgo(30), 'abc', 'HC-42M']
	];
	const file = (r: string[][]) =>
		'\uFEFFdie;counted_at;shots;press\r\n' + r.map((x) => x.join(';')).join('\r\n') + '\r\n';

	await upload(page, 'counters.csv', file(rows));
	await expect(page.getByTestId('preview-summary')).toContainText('2 valid');
	await expect(page.getByTestId('preview-summary')).toContainText('1 wrong');
	const bad = page.getByRole('row').filter({ hasText: 'Wrong' });
	await expect(bad).toHaveCount(1);
	await expect(bad).toContainText('shots: Shots must be a whole number (found "abc").');
	await expect(bad.getByRole('cell').first()).toHaveText('4');
	await page.screenshot({ path: info.outputPath('upload-preview-error.png'), fullPage: true });

	rows[2][2] = '75';
	await upload(page, 'counters-fixed.csv', file(rows));
	await expect(page.getByTestId('preview-summary')).toContainText('3 valid (285 shots)');
	await expect(page.getByTestId('preview-summary')).toContainText('0 wrong');
	await page.getByRole('button', { name: 'Count the 3 valid rows' }).click();
	const done = page.getByRole('status').filter({ hasText: 'counted 3 rows (285 shots)' });
	await expect(done).toBeVisible();
	await expect(done.getByRole('link', { name: 'D-0116' })).toBeVisible();
	await page.screenshot({ path: info.outputPath('upload-committed.png'), fullPage: true });

	await upload(page, 'counters-fixed.csv', file(rows));
	await expect(page.getByTestId('preview-summary')).toContainText('0 valid');
	await expect(page.getByTestId('preview-summary')).toContainText('3 already counted');
	await expect(page.getByRole('button', { name: 'No row to count' })).toBeDisabled();

	// The ledger list shows the upload under its source.
	await page.goto('/shots?q=D-0116&source=csv');
	await expect(page.locator('tbody tr')).toHaveCount(2);
});

test('a toolroom lead replaces a half and posts a correction with a reason', async ({ page }) => {
	await signIn(page, 'toolroom_lead');
	await page.goto('/dies/D-0113/shots');
	const cover = page.getByTestId('half-shots-cover');
	const form = page.locator('form[action="?/replaceHalf"]');
	await form.getByLabel('Half to replace').selectOption('cover');
	await form.getByLabel('New half serial').fill('D-0113-C2');
	await form.getByLabel('Reason').fill('Heat checking grade 4 across the cavity');
	await form.getByRole('button', { name: 'Replace half' }).click();
	await expect(
		page.getByText(
			/Cover half replaced: D-0113-C1 retired at [\d,]+ shots; D-0113-C2 starts at 0\./
		)
	).toBeVisible();
	await expect(cover).toHaveText('0');
	await expect(page.getByRole('row').filter({ hasText: 'D-0113-C1' })).toContainText(
		'Heat checking grade 4'
	);

	const correct = page.locator('form[action="?/correct"]');
	await correct.getByLabel('Shots to add').fill('-5');
	await correct.getByRole('button', { name: 'Post correction' }).click();
	await expect(correct.getByText(/Give the reason for the correction/)).toBeVisible();
	await correct.getByLabel('Reason').fill('Counter counted five dry cycles');
	await correct.getByRole('button', { name: 'Post correction' }).click();
	// The correction applies now, on the new cover half (0 shots): taking 5 off would make it negative.
	await expect(
		correct.getByText(/below zero shots \(the half on the die at that time has 0\)/)
	).toBeVisible();
	await correct.getByLabel('Shots to add').fill('7');
	await correct.getByRole('button', { name: 'Post correction' }).click();
	await expect(
		correct.getByText(/Correction \+7 shots posted\. Die total now [\d,]+\./)
	).toBeVisible();
	await expect(cover).toHaveText('7');
});

test('POST /api/v1/shots with a bearer token: 201, repeated key, 400 issues, 401, 404', async ({
	page,
	request
}) => {
	await signIn(page, 'admin');
	await page.goto('/admin/tokens');
	await page.getByLabel('Name').fill(`E2E shot feed ${Date.now()}`);
	await page.getByLabel(/^shots:write/).check();
	await page.getByRole('button', { name: 'Create token' }).click();
	const token = (await page.getByTestId('new-token').textContent())!.trim();
	expect(token).toMatch(/^cst_/);
	const auth = { authorization: `Bearer ${token}` };
	const key = `e2e-${Date.now()}`;

	const first = await request.post('/api/v1/shots', {
		headers: auth,
		data: { die: 'D-0118', shots: 5, machine: 'CC-40', key }
	});
	expect(first.status()).toBe(201);
	const body = await first.json();
	expect(body).toMatchObject({ accepted: 1, duplicates: 0, dies: [{ die: 'D-0118' }] });

	const again = await request.post('/api/v1/shots', {
		headers: auth,
		data: [{ die: 'D-0118', shots: 5, machine: 'CC-40', key }]
	});
	expect(again.status()).toBe(201);
	expect(await again.json()).toEqual({ accepted: 0, duplicates: 1, dies: body.dies, warnings: [] });

	const bad = await request.post('/api/v1/shots', {
		headers: auth,
		data: [
			{ die: 'D-0118', shots: 0 },
			{ die: 'D-0118', shots: 'five' },
			{ die: 'D-0999', shots: 1 }
		]
	});
	expect(bad.status()).toBe(400);
	expect(await bad.json()).toEqual({
		error: '3 of 3 entries have problems; nothing was counted.',
		issues: [
			{ index: 0, field: 'shots', message: 'shots must be a positive whole number.' },
			{ index: 1, field: 'shots', message: 'shots must be a number.' },
			{ index: 2, field: 'die', message: 'There is no die D-0999.' }
		]
	});

	const noToken = await request.post('/api/v1/shots', {
		headers: { authorization: 'Bearer cst_not-a-token' },
		data: { die: 'D-0118', shots: 1 }
	});
	expect(noToken.status()).toBe(401);
	expect(await noToken.json()).toEqual({ error: 'The API token is unknown, revoked or expired.' });

	const unknown = await request.post('/api/v1/shots', {
		headers: auth,
		data: { die: 'D-0999', shots: 1 }
	});
	expect(unknown.status()).toBe(404);
	expect(await unknown.json()).toEqual({ error: 'There is no die D-0999.' });

	// The signed-in admin's session is accepted too; the total only moved by the one entry.
	const check = await page.request.get('/api/v1/dies/D-0118');
	expect((await check.json()).totalShots).toBe(body.dies[0].totalShots);
	const order = await page.request.get(
		'/api/v1/dies/D-0118/order-check?parts=1000&scrapPct=2&shotsPerHour=120'
	);
	expect(order.status()).toBe(200);
	expect(await order.json()).toMatchObject({ die: 'D-0118', totalShots: body.dies[0].totalShots });
});
