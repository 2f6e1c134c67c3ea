// Walks every route of the owner portal as Brookmere's buyer with another owner's die in the
// parameters, and the dies API with a Brookmere-bound token. The routes are read from the folder
// at test time, so a route added later is walked without anyone remembering to list it.
// Dies used: D-0101 (own, as the control) and D-0112 (Lumenfold's, read only).
import fs from 'node:fs';
import path from 'node:path';
import { expect, test, type APIResponse } from '@playwright/test';
import { signIn } from './support';
import { createTokenAsAdmin, pdfText } from './owner-support';

const OWNER_ROOT = path.resolve('src/routes/owner');
const ROUTE_FILE = /^\+(page|page\.server|server)\.(ts|js|svelte)$/;

/** Another owner's value, and our own, for each route parameter. */
const PARAMS: Record<string, { foreign: string; own: string }> = {
	number: { foreign: 'D-0112', own: 'D-0101' }
};

/** Other owners' dies and names: none may appear in anything Brookmere's buyer gets. */
const OTHER_DIES = Array.from({ length: 33 }, (_, i) => `D-${String(112 + i).padStart(4, '0')}`);
const OTHER_NAMES = ['Lumenfold', 'Tollard', 'Ashcombe', 'LUMEN', 'TOLLARD', 'ASHENG'];
// D-0112's part, so an echo of the number asked for is told apart from its data.
const D0112_PART = 'Spotlight heat sink';

function listRoutes(dir: string, prefix = '/owner'): string[] {
	const entries = fs.readdirSync(dir, { withFileTypes: true });
	const here = entries.some((e) => e.isFile() && ROUTE_FILE.test(e.name)) ? [prefix] : [];
	const below = entries
		.filter((e) => e.isDirectory())
		.flatMap((e) => {
			// Route groups "(name)" add nothing to the URL.
			const segment = /^\(.*\)$/.test(e.name) ? '' : `/${e.name}`;
			return listRoutes(path.join(dir, e.name), prefix + segment);
		});
	return [...here, ...below];
}

function fill(route: string, which: 'foreign' | 'own'): string {
	return route.replace(/\[(\.\.\.)?([^\]=]+)(=[^\]]+)?\]/g, (_, _rest, name: string) => {
		const value = PARAMS[name];
		if (!value) throw new Error(`Route ${route} has a parameter [${name}]: add it to PARAMS.`);
		return value[which];
	});
}

async function bodyText(res: APIResponse): Promise<string> {
	const bytes = await res.body();
	return (res.headers()['content-type'] ?? '').includes('application/pdf')
		? pdfText(bytes)
		: bytes.toString('utf8');
}

/** The forbidden strings, except the one die number the caller itself put in the URL. */
function expectNoOtherOwnerData(url: string, body: string) {
	for (const n of OTHER_DIES) {
		if (url.includes(n)) continue;
		expect(body, `${url} shows ${n}`).not.toContain(n);
	}
	for (const name of OTHER_NAMES) expect(body, `${url} shows ${name}`).not.toContain(name);
	expect(body, `${url} shows D-0112's part`).not.toContain(D0112_PART);
}

const routes = listRoutes(OWNER_ROOT);

test('the owner portal has the routes this walk expects to find', () => {
	// A guard against the walk silently finding nothing (a moved folder, a wrong path).
	expect(routes).toEqual(
		expect.arrayContaining([
			'/owner',
			'/owner/dies/[number]',
			'/owner/export.csv',
			'/owner/statement.pdf'
		])
	);
});

test('every owner route refuses another owner’s die with 404 and shows none of its data', async ({
	page
}) => {
	await signIn(page, 'customer');
	for (const route of routes) {
		const foreign = fill(route, 'foreign');
		const res = await page.request.get(foreign, { maxRedirects: 0 });
		const body = await bodyText(res);
		if (foreign === route) {
			// No parameter: the route is the customer's own view and must work, yet hold only its data.
			expect(res.status(), foreign).toBe(200);
		} else {
			expect(res.status(), foreign).toBe(404);
			// The same route with an own die works, so the 404 above is the isolation, not a broken route.
			const own = fill(route, 'own');
			const ok = await page.request.get(own, { maxRedirects: 0 });
			expect(ok.status(), own).toBe(200);
			expect(await bodyText(ok), own).toContain(PARAMS.number.own);
		}
		expectNoOtherOwnerData(foreign, body);

		// The data SvelteKit sends on client-side navigation, for pages.
		if (fs.existsSync(path.join(OWNER_ROOT, route.replace(/^\/owner/, ''), '+page.svelte'))) {
			const dataUrl = `${foreign.replace(/\/$/, '')}/__data.json`;
			const data = await page.request.get(dataUrl, { maxRedirects: 0 });
			const text = await data.text();
			expectNoOtherOwnerData(dataUrl, text);
			if (foreign !== route) expect(text, dataUrl).toContain('"status":404');
		}
	}
});

test('the dies API with a Brookmere-bound token shows only Brookmere’s dies', async ({
	page,
	request
}) => {
	await signIn(page, 'admin');
	const token = await createTokenAsAdmin(page, 'e2e isolation walk', 'Brookmere Pumps');
	const auth = { headers: { authorization: `Bearer ${token}` } };

	const list = await request.get('/api/v1/dies?size=200', auth);
	expect(list.status()).toBe(200);
	const body = await list.text();
	expectNoOtherOwnerData('/api/v1/dies', body);
	expect(JSON.parse(body).dies.map((d: { number: string }) => d.number)).toContain('D-0101');

	const foreign = [
		'/api/v1/dies/D-0112',
		'/api/v1/dies/D-0112/order-check?parts=10&shotsPerHour=100',
		'/api/v1/dies?q=D-0112',
		'/api/v1/dies?owner=LUMEN'
	];
	for (const url of foreign) {
		const res = await request.get(url, auth);
		const text = await res.text();
		if (url.startsWith('/api/v1/dies?')) {
			expect(res.status(), url).toBe(200);
			expect(JSON.parse(text).dies, url).toEqual([]);
		} else {
			expect(res.status(), url).toBe(404);
		}
		expectNoOtherOwnerData(url, text);
	}
	// The control: the same calls on an own die answer.
	expect((await request.get('/api/v1/dies/D-0101', auth)).status()).toBe(200);
	expect(
		(await request.get('/api/v1/dies/D-0101/order-check?parts=10&shotsPerHour=100', auth)).status()
	).toBe(200);
});
