import { expect, test, type Page } from '@playwright/test';
import { signIn } from './support';

async function createToken(page: Page, name: string, scopes: string[], customer: string | null) {
	await page.goto('/admin/tokens');
	await page.getByLabel('Name').fill(name);
	for (const scope of ['dies:read', 'shots:write', 'bookings:write']) {
		const box = page.getByLabel(new RegExp(`^${scope}`));
		if (scopes.includes(scope)) await box.check();
		else await box.uncheck();
	}
	if (customer) await page.getByLabel('Bound to customer').selectOption({ label: customer });
	await page.getByRole('button', { name: 'Create token' }).click();
	const token = (await page.getByTestId('new-token').textContent())?.trim() ?? '';
	expect(token).toMatch(/^cst_/);
	return token;
}

test('dies API: bearer tokens, scopes, customer binding and 404 for other owners', async ({
	page,
	request
}) => {
	await signIn(page, 'admin');
	const plant = await createToken(page, 'e2e plant reader', ['dies:read'], null);
	const bound = await createToken(page, 'e2e Brookmere reader', ['dies:read'], 'Brookmere Pumps');
	const writer = await createToken(page, 'e2e writer only', ['shots:write'], null);
	const auth = (t: string) => ({ headers: { authorization: `Bearer ${t}` } });

	const all = await request.get('/api/v1/dies?size=200', auth(plant));
	expect(all.status()).toBe(200);
	const allBody = await all.json();
	expect(allBody.total).toBeGreaterThanOrEqual(44);

	const mine = await (await request.get('/api/v1/dies?size=200', auth(bound))).json();
	expect(mine.dies.length).toBe(11);
	expect(new Set(mine.dies.map((d: { customer: { code: string } }) => d.customer.code))).toEqual(
		new Set(['BRKPUMP'])
	);

	const own = await request.get('/api/v1/dies/D-0101', auth(bound));
	expect(own.status()).toBe(200);
	expect(await own.json()).toMatchObject({
		number: 'D-0101',
		customer: { code: 'BRKPUMP' },
		expectedLifeShots: 500000
	});

	const other = await request.get('/api/v1/dies/D-0112', auth(bound));
	expect(other.status()).toBe(404);
	expect(await other.text()).not.toContain('Lumenfold');

	expect((await request.get('/api/v1/dies/D-9999', auth(plant))).status()).toBe(404);
	expect((await request.get('/api/v1/dies', auth('cst_not-a-real-token'))).status()).toBe(401);
	expect(
		(await request.get('/api/v1/dies', { headers: { authorization: 'Basic abc' } })).status()
	).toBe(401);
	const noScope = await request.get('/api/v1/dies', auth(writer));
	expect(noScope.status()).toBe(403);
	expect(await noScope.json()).toEqual({ error: 'The API token lacks the scope dies:read.' });

	// Revoke the plant token in the UI (it asks first): it stops working at once.
	await page.goto('/admin/tokens');
	await page
		.getByRole('row', { name: /e2e plant reader/ })
		.getByRole('button', { name: 'Revoke…' })
		.click();
	// Asked, not yet revoked: the token still works.
	await expect(page.getByTestId('confirm-revoke')).toContainText('stops at once');
	expect((await request.get('/api/v1/dies', auth(plant))).status()).toBe(200);
	await page.getByRole('button', { name: 'Yes, revoke' }).click();
	await expect(page.getByRole('row', { name: /e2e plant reader/ })).toContainText('Revoked');
	expect((await request.get('/api/v1/dies', auth(plant))).status()).toBe(401);
});

test('dies API without credentials answers 401 in JSON', async ({ request }) => {
	const res = await request.get('/api/v1/dies');
	expect(res.status()).toBe(401);
	expect(await res.json()).toEqual({ error: 'Sign in or send an API token.' });
});

test('a customer session sees only its own dies through the API', async ({ page }) => {
	await signIn(page, 'otherCustomer');
	const res = await page.request.get('/api/v1/dies?size=200');
	const body = await res.json();
	expect(body.dies.every((d: { customer: { code: string } }) => d.customer.code === 'LUMEN')).toBe(
		true
	);
	expect((await page.request.get('/api/v1/dies/D-0101')).status()).toBe(404);
});
