import { expect, test } from '@playwright/test';
import { signIn } from './support';

test.describe('each role lands on its own home', () => {
	const homes = [
		['admin', '/plant', 'Plant overview'],
		['toolroom_lead', '/toolroom', 'Toolroom'],
		['toolmaker', '/toolroom', 'Toolroom'],
		['scheduler', '/planner', 'Planner'],
		['customer', '/owner', 'My tooling']
	] as const;
	for (const [who, path, heading] of homes) {
		test(`${who} signs in and sees ${heading}`, async ({ page }, info) => {
			await signIn(page, who);
			await expect(page).toHaveURL(new RegExp(`${path}$`));
			await expect(page.getByRole('heading', { level: 1, name: heading })).toBeVisible();
			await page.screenshot({ path: info.outputPath(`${who}-home.png`), fullPage: true });
		});
	}
});

test('a signed-out visit is sent to sign in and comes back afterwards', async ({ page }) => {
	await page.goto('/dies/D-0105');
	await expect(page).toHaveURL(/\/sign-in\?redirectTo=%2Fdies%2FD-0105/);
	await page.getByLabel('E-mail').fill('lead@kestrelvale.test');
	await page.getByLabel('Password').fill('castellan-demo');
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).toHaveURL(/\/dies\/D-0105$/);
	await expect(page.getByRole('heading', { level: 1, name: 'D-0105' })).toBeVisible();
});

test('a wrong password is refused with a plain message', async ({ page }) => {
	await page.goto('/sign-in');
	await page.getByLabel('E-mail').fill('planner@kestrelvale.test');
	await page.getByLabel('Password').fill('not-the-password');
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(
		page.getByText('That e-mail and password do not match an active account.')
	).toBeVisible();
	await expect(page).toHaveURL(/sign-in/);
});

test('a customer cannot open another owner’s die, nor the plant register', async ({ page }) => {
	await signIn(page, 'customer');
	// Brookmere Pumps owns D-0101..D-0111; D-0112 belongs to Lumenfold Lighting.
	await page.goto('/owner/dies/D-0101');
	await expect(page.getByRole('heading', { level: 1, name: 'D-0101' })).toBeVisible();
	const other = await page.goto('/owner/dies/D-0112');
	expect(other?.status()).toBe(404);
	await expect(page.getByText('Lumenfold')).toHaveCount(0);
	const plant = await page.goto('/dies/D-0101');
	expect(plant?.status()).toBe(403);
	await expect(page.getByText(/needs the role/)).toBeVisible();
});

test('the toolmaker may not open admin pages', async ({ page }) => {
	await signIn(page, 'toolmaker');
	const res = await page.goto('/admin/users');
	expect(res?.status()).toBe(403);
	await expect(
		page.getByText('This page needs the role Plant admin. You are signed in as Toolmaker.')
	).toBeVisible();
});
