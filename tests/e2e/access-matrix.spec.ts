import fs from 'node:fs';
import path from 'node:path';
import SQLite from 'better-sqlite3';
import {
	expect,
	request as playwrightRequest,
	test,
	type APIRequestContext,
	type APIResponse
} from '@playwright/test';
import {
	ACTIONS,
	ENDPOINTS,
	PAGES,
	PRINCIPALS,
	type Cells,
	type Outcome,
	type Principal
} from './access-table';
import { ACCOUNTS, DEMO_PASSWORD } from './support';

// Every page, form action and endpoint under src/routes, called as every kind of caller, against
// the one declared table in access-table.ts. A new route fails this test until it is declared.

const ROUTES = path.resolve('src/routes');
const BASE = `http://127.0.0.1:${process.env.E2E_PORT ?? 4173}`;

interface Discovered {
	pages: string[];
	actions: string[];
	endpoints: string[];
}

function discover(dir = ROUTES): Discovered {
	const found: Discovered = { pages: [], actions: [], endpoints: [] };
	const walk = (d: string) => {
		const id = '/' + path.relative(ROUTES, d).split(path.sep).join('/');
		const routeId = id === '/' ? '/' : id.replace(/\/$/, '');
		const files = fs.readdirSync(d, { withFileTypes: true });
		if (files.some((f) => /^\+page(@.*)?\.svelte$|^\+page(\.server)?\.ts$/.test(f.name)))
			found.pages.push(routeId);
		const server = path.join(d, '+page.server.ts');
		if (fs.existsSync(server)) {
			const text = fs.readFileSync(server, 'utf8');
			const at = text.indexOf('export const actions');
			if (at >= 0) {
				for (const m of text.slice(at).matchAll(/^\t(\w+):/gm))
					found.actions.push(`${routeId}?/${m[1]}`);
			}
		}
		const endpoint = path.join(d, '+server.ts');
		if (fs.existsSync(endpoint)) {
			const text = fs.readFileSync(endpoint, 'utf8');
			for (const m of text.matchAll(
				/export (?:const|async function|function) (GET|POST|PUT|PATCH|DELETE)\b/g
			)) {
				found.endpoints.push(`${m[1]} ${routeId}`);
			}
		}
		for (const f of files) if (f.isDirectory()) walk(path.join(d, f.name));
	};
	walk(dir);
	return found;
}

/** Real ids from the e2e database, so every parameterised route is called with something that exists. */
function parameters() {
	const db = new SQLite(
		path.resolve(`test-results/e2e-data-${process.env.E2E_PORT ?? 4173}/castellan.db`),
		{ readonly: true }
	);
	const one = <T>(sql: string) => db.prepare(sql).get() as T;
	const values = {
		booking: one<{ id: number }>('select id from press_bookings order by id limit 1').id,
		press: one<{ id: number }>(
			'select machine_id as id from shot_entries where machine_id is not null group by machine_id order by count(*) desc limit 1'
		).id,
		pressName: one<{ name: string }>('select name from machines order by id limit 1').name,
		job: one<{ number: string }>(
			'select toolroom_jobs.number from toolroom_jobs join dies on dies.id = toolroom_jobs.die_id order by toolroom_jobs.id limit 1'
		).number,
		photo: one<{ public_id: string }>(
			"select photos.public_id from photos join dies on dies.id = photos.die_id join customers on customers.id = dies.customer_id where photos.shared_with_owner = 1 and customers.code = 'BRKPUMP' limit 1"
		).public_id
	};
	db.close();
	return values;
}

function concrete(routeId: string, p: ReturnType<typeof parameters>): string {
	let url = routeId
		.replace('/photos/[id]', `/photos/${p.photo}`)
		.replace('/bookings/[id]', `/bookings/${p.booking}`)
		.replace('/presses/[id]', `/presses/${p.press}`)
		.replace('[press]', encodeURIComponent(p.pressName))
		.replace('[number]', 'D-0101')
		.replace('[job]', p.job)
		.replace('[token]', 'no-such-invitation')
		.replace('[variant]', 'thumb');
	if (url.endsWith('/order-check') && url.startsWith('/api')) url += '?parts=10&shotsPerHour=100';
	if (url === '/shots/die-summary') url += '?die=D-0101';
	return url;
}

function classify(res: APIResponse): Outcome | `status ${number}` {
	const s = res.status();
	if (s === 401) return 'unauth';
	if (s === 403) return 'deny';
	if (s === 404) return 'none';
	if (s >= 300 && s < 400)
		return (res.headers()['location'] ?? '').includes('/sign-in') ? 'login' : 'home';
	if (s >= 500) return `status ${s}`;
	return 'ok';
}

async function signedInContexts(): Promise<Record<Principal, APIRequestContext>> {
	const contexts = {} as Record<Principal, APIRequestContext>;
	for (const who of PRINCIPALS) {
		const ctx = await playwrightRequest.newContext({ baseURL: BASE });
		if (who !== 'anon') {
			const res = await ctx.post('/sign-in', {
				form: { email: ACCOUNTS[who], password: DEMO_PASSWORD },
				headers: { accept: 'text/html', origin: BASE },
				maxRedirects: 0
			});
			expect(res.status(), `sign-in of ${who}`).toBe(303);
		}
		contexts[who] = ctx;
	}
	return contexts;
}

const formHeaders = { accept: 'text/html', origin: BASE };

test.describe.configure({ mode: 'serial' });
test.setTimeout(240_000);

test('every route under src/routes is declared in the access table', () => {
	const found = discover();
	expect(
		found.pages.filter((r) => !(r in PAGES)),
		'pages missing from PAGES'
	).toEqual([]);
	expect(
		found.actions.filter((r) => !(r in ACTIONS)),
		'actions missing from ACTIONS'
	).toEqual([]);
	expect(
		found.endpoints.filter((r) => !(r in ENDPOINTS)),
		'endpoints missing from ENDPOINTS'
	).toEqual([]);
	// And the table names nothing that no longer exists.
	expect(Object.keys(PAGES).filter((r) => !found.pages.includes(r))).toEqual([]);
	expect(Object.keys(ACTIONS).filter((r) => !found.actions.includes(r))).toEqual([]);
	expect(Object.keys(ENDPOINTS).filter((r) => !found.endpoints.includes(r))).toEqual([]);
});

test('every page, action and endpoint answers each caller as declared', async () => {
	const p = parameters();
	const ctx = await signedInContexts();
	const differences: string[] = [];
	const check = (key: string, who: Principal, expected: Cells, got: Outcome | string) => {
		if (expected[who] !== got)
			differences.push(`${key} as ${who}: expected ${expected[who]}, got ${got}`);
	};

	for (const [routeId, cells] of Object.entries(PAGES)) {
		if (routeId === '/sign-out') continue;
		for (const who of PRINCIPALS) {
			const res = await ctx[who].get(concrete(routeId, p), {
				maxRedirects: 0,
				headers: { accept: 'text/html' }
			});
			check(`GET ${routeId}`, who, cells, classify(res));
		}
	}
	for (const [key, cells] of Object.entries(ENDPOINTS)) {
		const [method, routeId] = key.split(' ');
		for (const who of PRINCIPALS) {
			const url = concrete(routeId, p);
			const res =
				method === 'GET'
					? await ctx[who].get(url, { maxRedirects: 0 })
					: await ctx[who].fetch(url, {
							method,
							data: {},
							headers: { origin: BASE },
							maxRedirects: 0
						});
			check(key, who, cells, classify(res));
		}
	}
	// Actions last; signing out last of all, since it ends the session.
	const actions = Object.entries(ACTIONS).sort(
		([a], [b]) => Number(a.startsWith('/sign-out')) - Number(b.startsWith('/sign-out'))
	);
	for (const [key, cells] of actions) {
		const [routeId, action] = key.split('?/');
		const url = concrete(routeId, p) + (action === 'default' ? '' : `?/${action}`);
		for (const who of PRINCIPALS) {
			const res = await ctx[who].post(url, { form: {}, headers: formHeaders, maxRedirects: 0 });
			check(`POST ${key}`, who, cells, classify(res));
		}
	}
	const sample = await ctx.anon.get('/sign-out', { maxRedirects: 0 });
	check('GET /sign-out', 'anon', PAGES['/sign-out'], classify(sample));
	for (const c of Object.values(ctx)) await c.dispose();
	expect(differences).toEqual([]);
});
