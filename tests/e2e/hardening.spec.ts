import http from 'node:http';
// Issue 14 (hardening), the items best seen from outside: request size before and after sign-in
// (4), the reserved action name (11), cache and security headers (14) and signing in twice (15).
// Uses the demo plant read-only, plus its own request contexts.
import path from 'node:path';
import SQLite from 'better-sqlite3';
import { expect, test, type APIRequestContext } from '@playwright/test';
import { ACCOUNTS, DEMO_PASSWORD, signIn, type Account } from './support';

const PORT = process.env.E2E_PORT ?? '4173';
const BASE = `http://127.0.0.1:${PORT}`;

async function signedIn(
	playwright: { request: { newContext: (o: object) => Promise<APIRequestContext> } },
	who: Account
) {
	const ctx = await playwright.request.newContext({ baseURL: BASE });
	const res = await ctx.post('/sign-in', {
		form: { email: ACCOUNTS[who], password: DEMO_PASSWORD },
		headers: { origin: BASE, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(res.status()).toBe(303);
	return ctx;
}

function firstJob(): string {
	const db = new SQLite(path.resolve(`test-results/e2e-data-${PORT}/castellan.db`), {
		readonly: true
	});
	const row = db.prepare('select number from toolroom_jobs order by id limit 1').get() as {
		number: string;
	};
	db.close();
	return row.number;
}

/** A multipart body of about `bytes` bytes holding one file field. */
function multipart(field: string, bytes: number) {
	return { [field]: { name: 'big.jpg', mimeType: 'image/jpeg', buffer: Buffer.alloc(bytes, 1) } };
}

/** A POST that announces `length` bytes, sends 64 kB of them, and returns the answer it gets. */
function postAnnouncingLength(
	url: string,
	length: number
): Promise<{ status: number; text: string; headers: http.IncomingHttpHeaders }> {
	return new Promise((resolve, reject) => {
		const req = http.request(new URL(url, BASE), {
			method: 'POST',
			headers: {
				'content-type': 'application/x-www-form-urlencoded',
				'content-length': String(length),
				origin: BASE
			}
		});
		req.on('response', (res) => {
			let text = '';
			res.setEncoding('utf8');
			res.on('data', (chunk) => (text += chunk));
			res.on('end', () => {
				req.destroy();
				resolve({ status: res.statusCode ?? 0, text, headers: res.headers });
			});
		});
		req.on('error', reject);
		req.write(Buffer.alloc(64 * 1024, 0x61));
	});
}

test.describe('item 4: request size is judged before the body is read', () => {
	test('an anonymous 5 MB post to a missing page or to sign-in gets 413 with a sentence', async ({
		request
	}) => {
		for (const url of ['/no-such-page', '/sign-in']) {
			// Announce 5 MB and send only the first 64 kB: the answer must come from the headers alone
			// (a client still pushing the rest would only see its socket closed).
			const res = await postAnnouncingLength(url, 5_000_000);
			expect(res.status, url).toBe(413);
			expect(res.text, url).toMatch(/too large: the body is larger than 1 MB/);
			expect(res.headers['connection'], url).toBe('close');
			// The unread body must not poison the next request from the same client.
			const next = await request.post('/sign-in', {
				form: { email: '', password: '' },
				headers: { origin: BASE, accept: 'text/html' },
				maxRedirects: 0
			});
			expect(next.status(), url).toBeLessThan(500);
		}
	});

	test('a 2 MB JSON post to the bookings API is refused for a customer before it is parsed', async ({
		playwright
	}) => {
		const ctx = await signedIn(playwright, 'customer');
		const res = await ctx.post('/api/v1/bookings', {
			data: Buffer.alloc(2_000_000, 0x20),
			headers: { 'content-type': 'application/json', origin: BASE }
		});
		expect(res.status()).toBe(413);
		expect((await res.json()).error).toMatch(/too large/);
		await ctx.dispose();
	});

	test('a 2 MB photo post passes the size check for a toolmaker, not for a scheduler', async ({
		playwright
	}) => {
		const job = firstJob();
		const toolmaker = await signedIn(playwright, 'toolmaker');
		const allowed = await toolmaker.post(`/jobs/${job}?/upload`, {
			multipart: multipart('photos', 2_000_000),
			headers: { origin: BASE, accept: 'text/html' },
			maxRedirects: 0
		});
		// Not a JPEG, so the photo check refuses it, but not for its size.
		expect(allowed.status()).not.toBe(413);
		const scheduler = await signedIn(playwright, 'scheduler');
		const refused = await scheduler.post(`/jobs/${job}?/upload`, {
			multipart: multipart('photos', 2_000_000),
			headers: { origin: BASE, accept: 'text/html' },
			maxRedirects: 0
		});
		expect(refused.status()).toBe(413);
		await Promise.all([toolmaker.dispose(), scheduler.dispose()]);
	});
});

test('item 11: POST ?/default answers 404 with a sentence, not a 500 or a stack trace', async ({
	playwright
}) => {
	const admin = await signedIn(playwright, 'admin');
	for (const url of ['/dies', '/admin/users', '/sign-in', '/account', '/bookings/new']) {
		const res = await admin.post(`${url}?/default`, {
			form: { x: '1' },
			headers: { origin: BASE, accept: 'text/html' },
			maxRedirects: 0
		});
		expect(res.status(), url).toBe(404);
		const body = await res.text();
		expect(body, url).toContain('There is no form action called "default" here.');
		expect(body, url).not.toMatch(/\bat .+:\d+:\d+|Error:/);
	}
	await admin.dispose();
});

test.describe('item 14: cache and security headers', () => {
	test('signed-in pages, JSON and CSV say private, no-store; photos a short private life', async ({
		playwright
	}) => {
		const admin = await signedIn(playwright, 'admin');
		for (const url of ['/dies', '/api/v1/dies', '/dies/export.csv', '/jobs/export.csv']) {
			const res = await admin.get(url);
			expect(res.status(), url).toBe(200);
			expect(res.headers()['cache-control'], url).toBe('private, no-store');
		}
		const customer = await signedIn(playwright, 'customer');
		for (const url of [
			'/owner',
			'/owner/export.csv',
			'/api/v1/bookings?from=2026-01-01&to=2026-01-31'
		]) {
			const res = await customer.get(url);
			expect(res.status(), url).toBe(200);
			expect(res.headers()['cache-control'], url).toBe('private, no-store');
		}
		const db = new SQLite(path.resolve(`test-results/e2e-data-${PORT}/castellan.db`), {
			readonly: true
		});
		const photo = db.prepare('select public_id from photos limit 1').get() as { public_id: string };
		db.close();
		const res = await admin.get(`/photos/${photo.public_id}/thumb`);
		expect(res.status()).toBe(200);
		expect(res.headers()['cache-control']).toBe('private, max-age=300');
		await Promise.all([admin.dispose(), customer.dispose()]);
	});

	test('/favicon.svg carries the security headers', async ({ request }) => {
		const res = await request.get('/favicon.svg');
		expect(res.status()).toBe(200);
		expect(res.headers()['content-type']).toContain('image/svg+xml');
		expect(res.headers()['x-content-type-options']).toBe('nosniff');
		expect(res.headers()['x-frame-options']).toBe('DENY');
		expect(res.headers()['referrer-policy']).toBe('same-origin');
	});
});

test('item 15: signing in again ends the session the browser had before', async ({
	playwright
}) => {
	const ctx = await signedIn(playwright, 'scheduler');
	const cookieName = 'castellan_session';
	const first = (await ctx.storageState()).cookies.find((c) => c.name === cookieName)?.value;
	expect(first).toBeTruthy();
	const again = await ctx.post('/sign-in', {
		form: { email: ACCOUNTS.scheduler, password: DEMO_PASSWORD },
		headers: { origin: BASE, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(again.status()).toBe(303);
	const second = (await ctx.storageState()).cookies.find((c) => c.name === cookieName)?.value;
	expect(second).toBeTruthy();
	expect(second).not.toBe(first);
	// The old session cookie, sent on its own, no longer opens a page.
	const old = await playwright.request.newContext({
		baseURL: BASE,
		extraHTTPHeaders: { cookie: `${cookieName}=${first}` }
	});
	const res = await old.get('/bookings', { maxRedirects: 0 });
	expect(res.status()).toBe(303);
	expect(res.headers()['location']).toContain('/sign-in');
	await Promise.all([ctx.dispose(), old.dispose()]);
});

test('item 5: a customer session and a customer-bound token get only the customer fields from every API route', async ({
	playwright
}) => {
	const admin = await signedIn(playwright, 'admin');
	const db = new SQLite(path.resolve(`test-results/e2e-data-${PORT}/castellan.db`), {
		readonly: true
	});
	const customerId = (
		db.prepare("select id from customers where code = 'BRKPUMP'").get() as { id: number }
	).id;
	db.close();
	const made = await admin.post('/admin/tokens?/create', {
		form: { name: 'e2e hardening Brookmere', scopes: 'dies:read', customerId: String(customerId) },
		headers: { origin: BASE, accept: 'text/html' },
		maxRedirects: 0
	});
	const token = /data-testid="new-token"[^>]*>\s*(cst_[^<\s]+)/.exec(await made.text())?.[1];
	expect(token).toMatch(/^cst_/);
	const customer = await signedIn(playwright, 'customer');
	const bearer = await playwright.request.newContext({
		baseURL: BASE,
		extraHTTPHeaders: { authorization: `Bearer ${token}` }
	});

	// The fields a tooling owner may read, written out here from the issue and the owner portal:
	// no order reference, planned rate, scrap allowance or planner notes.
	const DIE = [
		'number',
		'part',
		// Shown in the owner portal and its CSV as well.
		'partNumber',
		'customer',
		'alloy',
		'family',
		'status',
		'totalShots',
		'expectedLifeShots',
		'lifeUsedPct',
		'nextService',
		'shotsPerDay',
		'projectedEndOfLife',
		// Life follows the steel: the owner sees which half sets it and each half's shots.
		'shotsRemaining',
		'lifeSide',
		'halves'
	];
	const BOOKING = [
		'id',
		'die',
		'part',
		'customer',
		'press',
		'startsAt',
		'endsAt',
		'parts',
		'shotsPlanned',
		'status',
		'cancelledAt'
	];
	const day = (offset: number) =>
		new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);
	const from = day(-30);
	const to = day(60);
	for (const caller of [customer, bearer]) {
		const list = await (await caller.get('/api/v1/dies?size=200')).json();
		for (const d of list.dies) expect(Object.keys(d).every((k) => DIE.includes(k))).toBe(true);
		const one = await (await caller.get('/api/v1/dies/D-0101')).json();
		expect(Object.keys(one).sort()).toEqual([...DIE].sort());
		const check = await caller.get('/api/v1/dies/D-0101/order-check?parts=10&shotsPerHour=100');
		expect(check.status()).toBe(200);
		expect(Object.keys(await check.json())).not.toContain('notes');
		const bookings = (await (await caller.get(`/api/v1/bookings?from=${from}&to=${to}`)).json())
			.bookings as Record<string, unknown>[];
		expect(bookings.length).toBeGreaterThan(0);
		for (const b of bookings) {
			expect(
				Object.keys(b).every((k) => BOOKING.includes(k)),
				Object.keys(b).join()
			).toBe(true);
			expect(b).not.toHaveProperty('orderRef');
			expect(b).not.toHaveProperty('shotsPerHour');
			expect(b).not.toHaveProperty('notes');
		}
		const board = await (await caller.get(`/api/v1/board?from=${from}&days=56`)).json();
		expect(board.bookings.columns).not.toContain('order');
		expect(JSON.stringify(board.bookings.rows)).not.toMatch(/SO-\d+/);
		// TJ-00007 on D-0109 is open and not shared with the owner.
		expect(JSON.stringify(board.jobs.rows)).not.toContain('TJ-00007');
	}
	// The plant still sees all of it (so the checks above can fail).
	const plantBookings = (await (await admin.get(`/api/v1/bookings?from=${from}&to=${to}`)).json())
		.bookings as Record<string, unknown>[];
	expect(plantBookings.some((b) => typeof b.orderRef === 'string')).toBe(true);
	expect(plantBookings[0]).toHaveProperty('shotsPerHour');
	const plantBoard = await (await admin.get(`/api/v1/board?from=${from}&days=56`)).json();
	expect(plantBoard.bookings.columns).toContain('order');
	expect(JSON.stringify(plantBoard.jobs.rows)).toContain('TJ-00007');
	await Promise.all([admin.dispose(), customer.dispose(), bearer.dispose()]);
});

test('item 21: the outbox shows the notice schedule and an admin can run the notices now', async ({
	page
}) => {
	await signIn(page, 'admin');
	await page.goto('/admin/outbox');
	// The e2e server runs with NOTICE_CRON=off.
	await expect(page.getByTestId('next-run')).toContainText('off on this server');
	await page.getByRole('button', { name: 'Run now' }).click();
	await expect(page.getByRole('status').first()).toContainText('The notice run finished');
	await page.goto('/admin/audit');
	await expect(page.getByRole('table')).toContainText('notice.run_now');
});

test('item 20: inviting a Brookmere user from another e-mail domain asks for confirmation first', async ({
	playwright
}) => {
	const admin = await signedIn(playwright, 'admin');
	const db = new SQLite(path.resolve(`test-results/e2e-data-${PORT}/castellan.db`), {
		readonly: true
	});
	const customerId = (
		db.prepare("select id from customers where code = 'BRKPUMP'").get() as { id: number }
	).id;
	db.close();
	const email = `e2e.hardening.${Date.now()}@elsewhere.test`;
	const form = { customerId: String(customerId), name: 'Dana Elsewhere', email };
	const asked = await admin.post('/admin/invites?/create', {
		form,
		headers: { origin: BASE, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(asked.status()).toBe(409);
	expect(await asked.text()).toContain('elsewhere.test is not among this customer');
	const list = await (await admin.get('/admin/invites')).text();
	expect(list).not.toContain(email);
	const sent = await admin.post('/admin/invites?/create', {
		form: { ...form, confirmDomain: 'on' },
		headers: { origin: BASE, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(sent.status()).toBe(200);
	expect(await sent.text()).toContain('data-testid="invite-link"');
	await admin.dispose();
});
