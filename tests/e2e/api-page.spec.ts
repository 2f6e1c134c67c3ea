import { execFileSync } from 'node:child_process';
import { expect, test } from '@playwright/test';
import { signIn } from './support';

// The admin API page's examples (issue 15 item 6) are run as shown: the token is made by following
// the page's steps in the UI, then every curl command on the page runs in bash with the real curl
// against the built app, with the two variables the page tells the reader to export.

test('the API page’s token steps and curl examples work against the demo', async ({
	page
}, info) => {
	await signIn(page, 'admin');
	await page.goto('/');
	await page.getByRole('link', { name: 'API', exact: true }).first().click();
	await expect(page).toHaveURL(/\/admin\/api$/);
	await expect(page.getByRole('heading', { level: 1, name: 'API' })).toBeVisible();
	await page.screenshot({ path: info.outputPath('api-page.png'), fullPage: true });

	// Step 1, as written: API tokens, name, scopes, create, copy the secret.
	await page.getByRole('link', { name: 'API tokens' }).first().click();
	await page.getByLabel('Name').fill('e2e API page examples');
	for (const scope of ['dies:read', 'shots:write', 'bookings:write']) {
		await page.getByLabel(new RegExp(`^${scope}`)).check();
	}
	await page.getByRole('button', { name: 'Create token' }).click();
	const token = (await page.getByTestId('new-token').textContent())?.trim() ?? '';
	expect(token).toMatch(/^cst_/);

	await page.goto('/admin/api');
	// Step 2: the address shown is the one the page was reached at.
	const setup = (await page.getByTestId('curl-setup').textContent()) ?? '';
	const url = /export CASTELLAN_URL=(\S+)/.exec(setup)?.[1] ?? '';
	expect(url).toBe(new URL(page.url()).origin);

	const examples = page.getByTestId('curl-example');
	const ids = await examples.evaluateAll((els) => els.map((e) => e.getAttribute('data-example')));
	expect(ids).toEqual(['dies', 'die', 'shots', 'order-check', 'openapi']);
	const run = (command: string) =>
		JSON.parse(
			execFileSync('bash', ['-c', command], {
				env: { PATH: process.env.PATH, CASTELLAN_URL: url, CASTELLAN_TOKEN: token },
				encoding: 'utf8',
				timeout: 30_000
			})
		);
	const command = async (id: string) =>
		(await page.locator(`[data-example="${id}"]`).textContent()) ?? '';

	// curl --fail-with-body exits non-zero on an error status, so each run below is a success.
	const dies = run(await command('dies'));
	expect(dies.dies.length).toBeGreaterThan(0);
	expect(dies.dies.every((d: { partNumber: string }) => d.partNumber.startsWith('LUM-'))).toBe(
		true
	);
	const die = run(await command('die'));
	expect(die).toMatchObject({ number: 'D-0120' });

	const shots = await command('shots');
	expect(shots).toContain('"key"');
	const first = run(shots);
	expect(first).toMatchObject({ accepted: 1, duplicates: 0 });
	expect(first.dies[0].totalShots).toBe(die.totalShots + 120);
	// The same command again — a retry — is acknowledged and not counted twice.
	const again = run(shots);
	expect(again).toMatchObject({ accepted: 0, duplicates: 1 });
	expect(again.dies[0].totalShots).toBe(die.totalShots + 120);

	const check = run(await command('order-check'));
	expect(check).toMatchObject({ die: 'D-0120', press: 'CC-84', rateIsDefault: true });
	expect(['fits', 'warning', 'blocked']).toContain(check.verdict);
	const description = run(await command('openapi'));
	expect(description.openapi).toMatch(/^3\.1\./);

	// Without the token the same command fails (curl exits non-zero), so the runs above are real.
	expect(() =>
		execFileSync('bash', ['-c', shots], {
			env: { PATH: process.env.PATH, CASTELLAN_URL: url, CASTELLAN_TOKEN: 'cst_wrong' },
			encoding: 'utf8',
			stdio: 'pipe'
		})
	).toThrow();
});

test('the API page fits a 390 px phone', async ({ browser }) => {
	const context = await browser.newContext({ viewport: { width: 390, height: 844 } });
	const page = await context.newPage();
	await signIn(page, 'admin');
	await page.goto('/admin/api');
	const widths = await page.evaluate(() => [
		document.documentElement.scrollWidth,
		document.documentElement.clientWidth
	]);
	expect(widths[0]).toBeLessThanOrEqual(widths[1]);
	await context.close();
});
