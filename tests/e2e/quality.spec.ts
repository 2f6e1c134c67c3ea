import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';
import { signIn, type Account } from './support';

// Main pages of each role; axe must find no serious or critical violation on any of them. Die
// pages use D-0121, D-0122 and D-0124 (only read here); JOB stands for a toolroom job reached by
// following the first job link on /jobs, since job numbers depend on the demo data.
const JOB = 'JOB';
const PAGES: Record<Account, string[]> = {
	admin: [
		'/plant',
		'/dies',
		'/dies/D-0124',
		'/settings',
		'/admin/users',
		'/admin/tokens',
		'/admin/invites',
		'/admin/outbox',
		'/fleet',
		'/board',
		'/presses',
		'/jobs',
		'/account'
	],
	toolroom_lead: [
		'/toolroom',
		'/jobs',
		JOB,
		'/dies/D-0121/plan',
		'/dies/D-0121/shots',
		'/dies/D-0121/jobs',
		'/dies/D-0121/surface',
		'/dies/D-0121/cooling',
		'/dies/D-0121/sharing',
		'/dies/D-0121/bookings',
		'/dies/D-0121/edit',
		'/dies/new',
		'/fleet',
		'/shots',
		'/shots/new',
		'/shots/upload'
	],
	toolmaker: [
		'/toolroom',
		'/jobs',
		JOB,
		'/dies?status=in_toolroom',
		'/dies/D-0122/surface',
		'/dies/D-0122/cooling'
	],
	scheduler: [
		'/planner',
		'/board',
		'/order-check',
		'/order-check?die=D-0124&parts=20000',
		'/bookings',
		'/bookings/new',
		'/presses',
		'/shots/new',
		'/dies?sort=life&dir=desc'
	],
	customer: ['/owner', '/owner/dies/D-0104', '/owner/access', '/account'],
	otherCustomer: ['/owner/dies/D-0121']
};

/** Opens the page, following the first job link on the jobs board for JOB. */
async function openPage(page: Page, path: string) {
	if (path !== JOB) {
		const res = await page.goto(path);
		expect(res?.status(), path).toBe(200);
		return;
	}
	await page.goto('/jobs');
	await page
		.getByRole('link', { name: /^TJ-\d+$/ })
		.first()
		.click();
	await expect(page).toHaveURL(/\/jobs\/TJ-\d+$/);
}

for (const [who, paths] of Object.entries(PAGES)) {
	for (const path of paths) {
		test(`accessibility: ${who} ${path} has no serious or critical axe violations`, async ({
			page
		}) => {
			await signIn(page, who as Account);
			await openPage(page, path);
			const results = await new AxeBuilder({ page }).analyze();
			const bad = results.violations.filter(
				(v) => v.impact === 'serious' || v.impact === 'critical'
			);
			expect(
				bad.map(
					(v) =>
						`${v.id} (${v.nodes.length}) ${v.help}: ${v.nodes
							.slice(0, 3)
							.map((n) => n.target)
							.join(' | ')}`
				)
			).toEqual([]);
		});
	}
}

test('a form showing its field errors has no serious or critical axe violations', async ({
	page
}) => {
	await signIn(page, 'toolroom_lead');
	await page.goto('/dies/new');
	await page.getByRole('button', { name: 'Register die' }).click();
	await expect(page.locator('[aria-invalid="true"]').first()).toBeVisible();
	const results = await new AxeBuilder({ page }).analyze();
	expect(
		results.violations
			.filter((v) => v.impact === 'serious' || v.impact === 'critical')
			.map((v) => `${v.id}: ${v.nodes[0]?.target}`)
	).toEqual([]);
});

test('the sign-in page is accessible and carries the security headers', async ({ page }) => {
	const res = await page.goto('/sign-in');
	const h = res!.headers();
	expect(h['content-security-policy']).toContain("default-src 'self'");
	expect(h['content-security-policy']).toContain("frame-ancestors 'none'");
	expect(h['x-content-type-options']).toBe('nosniff');
	expect(h['referrer-policy']).toBe('same-origin');
	const results = await new AxeBuilder({ page }).analyze();
	expect(
		results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical')
	).toEqual([]);
});

test('hostile input on sign-in and the dies API gets 4xx and the server stays up', async ({
	request
}) => {
	const huge = 'x'.repeat(600_000);
	// As a browser posts a form without JavaScript.
	const html = { accept: 'text/html', origin: 'http://127.0.0.1:4173' };
	const attempts = [
		request.post('/sign-in', { form: { email: huge, password: huge }, headers: html }),
		request.post('/sign-in', {
			form: { email: '<script>alert(1)</script>@x.test', password: 'p' },
			headers: html
		}),
		request.post('/sign-in', {
			data: '{"email":',
			headers: { ...html, 'content-type': 'application/json' }
		}),
		request.post('/sign-in', {
			form: { email: 'a@b.test', password: 'p' },
			headers: { ...html, origin: 'http://evil.test' }
		}),
		request.get('/api/v1/dies?page=999999999999999999999&size=-4&sort=%00'),
		request.get('/api/v1/dies/..%2F..%2Fetc%2Fpasswd'),
		request.get('/dies/%F0%9F%92%A5', { maxRedirects: 0 })
	];
	for (const res of await Promise.all(attempts)) {
		expect(res.status(), await res.text().then((t) => t.slice(0, 200))).toBeGreaterThanOrEqual(300);
		expect(res.status()).toBeLessThan(500);
		expect(await res.text()).not.toContain('<script>alert(1)</script>');
	}
	expect((await request.get('/sign-in')).status()).toBe(200);
});
