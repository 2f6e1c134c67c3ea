import AxeBuilder from '@axe-core/playwright';
import { expect, test } from '@playwright/test';
import { signIn, type Account } from './support';

// Main pages of each role; axe must find no serious or critical violation on any of them.
const PAGES: Record<Exclude<Account, 'otherCustomer'>, string[]> = {
	admin: ['/plant', '/dies', '/settings', '/admin/users', '/admin/tokens', '/account'],
	toolroom_lead: ['/toolroom', '/dies/D-0130', '/dies/new'],
	toolmaker: ['/toolroom', '/dies?status=in_toolroom'],
	scheduler: ['/planner', '/dies?sort=life&dir=desc'],
	customer: ['/owner', '/owner/dies/D-0104']
};

for (const [who, paths] of Object.entries(PAGES)) {
	for (const path of paths) {
		test(`accessibility: ${who} ${path} has no serious or critical axe violations`, async ({
			page
		}) => {
			await signIn(page, who as Account);
			await page.goto(path);
			const results = await new AxeBuilder({ page }).analyze();
			const bad = results.violations.filter(
				(v) => v.impact === 'serious' || v.impact === 'critical'
			);
			expect(
				bad.map((v) => `${v.id} (${v.nodes.length}) ${v.help}: ${v.nodes[0]?.target}`)
			).toEqual([]);
		});
	}
}

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
