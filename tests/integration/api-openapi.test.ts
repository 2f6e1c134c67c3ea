// The OpenAPI 3.1 description of /api/v1 against the routes' real answers (issue 15 item 6).
// The document itself is checked with @seriousme/openapi-schema-validator (the OpenAPI 3.1 schema);
// every answer below — successes and errors — comes from the real endpoint handlers on a file
// database seeded with the demo plant, and is validated with Ajv's JSON Schema 2020-12 validator
// (OpenAPI 3.1 schemas are 2020-12) against the response the document gives for its status.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Validator } from '@seriousme/openapi-schema-validator';
import { Ajv2020, type ValidateFunction } from 'ajv/dist/2020.js';
import addFormats from 'ajv-formats';
import { afterAll, beforeAll, describe, expect, test, vi } from 'vitest';
import { seedDemo } from '../../scripts/lib/demo-scenario';
import { folderPhotoStore } from '../../src/lib/server/photos/folder-store';
import { migrateToLatest, openDatabase, type DB } from '../../src/lib/server/db/connect';
import { OPENAPI_DOCUMENT } from '../../src/lib/server/api/openapi';
import { toUtcIso } from '../../src/lib/schemas/schedule';
import { createApiToken } from '../../src/lib/server/auth/tokens';
import { isPostgresUrl, newTestDatabaseTarget } from '../../src/lib/server/db/connect';

vi.mock('$env/dynamic/private', () => ({ env: process.env }));

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-openapi-'));
process.env.DATABASE_PATH = path.join(dir, 'castellan.db');
process.env.UPLOAD_DIR = path.join(dir, 'uploads');
fs.mkdirSync(process.env.UPLOAD_DIR);

const ORIGIN = 'http://castellan.test';
const API_DIR = path.resolve('src/routes/api/v1');

let db: DB;
const tokens = { plant: '', owner: '', ownerBooker: '', reader: '', writer: '' };
let ownerDie = '';
let otherOwnerDie = '';

beforeAll(async () => {
	// On the PostgreSQL pass the app's own handle (getDb) opens a fresh schema through DATABASE_URL.
	const target = await newTestDatabaseTarget(process.env.DATABASE_PATH!);
	if (isPostgresUrl(target)) process.env.DATABASE_URL = target;
	const seedDb = openDatabase(target);
	await migrateToLatest(seedDb);
	await seedDemo(seedDb, new Date(), folderPhotoStore(process.env.UPLOAD_DIR!));
	await seedDb.destroy();
	const { getDb } = await import('../../src/lib/server/db');
	db = getDb();
	const brk = await db
		.selectFrom('customers')
		.select('id')
		.where('code', '=', 'BRKPUMP')
		.executeTakeFirstOrThrow();
	const make = async (name: string, scopes: string[], customerId: number | null) =>
		(
			await createApiToken(db, {
				name,
				scopes: scopes as never,
				customerId,
				createdBy: null
			})
		).token;
	tokens.plant = await make('openapi plant', ['dies:read', 'shots:write', 'bookings:write'], null);
	tokens.owner = await make('openapi Brookmere', ['dies:read'], brk.id);
	tokens.ownerBooker = await make('openapi Brookmere booker', ['bookings:write'], brk.id);
	tokens.reader = await make('openapi reader', ['dies:read'], null);
	tokens.writer = await make('openapi writer', ['shots:write'], null);
	const dies = await db
		.selectFrom('dies')
		.select(['number', 'customer_id'])
		.where('status', '!=', 'retired')
		.orderBy('number')
		.execute();
	ownerDie = dies.find((d) => d.customer_id === brk.id)!.number;
	otherOwnerDie = dies.find((d) => d.customer_id !== brk.id)!.number;
	// Seeding the demo plant takes about two minutes on PostgreSQL (one round trip per statement).
}, 300_000);

afterAll(async () => {
	await db?.destroy();
	delete process.env.DATABASE_URL;
	fs.rmSync(dir, { recursive: true, force: true });
});

// ---- the routes on disk, as the document must name them -------------------------------------

function routesOnDisk(): string[] {
	const found: string[] = [];
	const walk = (folder: string) => {
		for (const entry of fs.readdirSync(folder, { withFileTypes: true })) {
			const full = path.join(folder, entry.name);
			if (entry.isDirectory()) walk(full);
			else if (entry.name === '+server.ts') {
				const route = path
					.relative(API_DIR, folder)
					.split(path.sep)
					.map((part) => part.replace(/^\[(.+)\]$/, '{$1}'))
					.join('/');
				const source = fs.readFileSync(full, 'utf8');
				for (const m of source.matchAll(/export const (GET|POST|PUT|PATCH|DELETE)\b/g)) {
					found.push(`${m[1].toLowerCase()} /${route}`);
				}
			}
		}
	};
	walk(API_DIR);
	return found.sort();
}

// ---- calling the real handlers --------------------------------------------------------------

type Method = 'GET' | 'POST' | 'PATCH';
interface Call {
	token?: string | null;
	body?: unknown;
	contentType?: string;
}

/** The route file of a concrete path, and its params: /dies/D-0101 → dies/[number]. */
function resolve(template: string, concrete: string) {
	const t = template.split('/').filter(Boolean);
	const c = concrete.split('?')[0].split('/').filter(Boolean);
	const params: Record<string, string> = {};
	t.forEach((part, i) => {
		const m = /^\{(.+)\}$/.exec(part);
		if (m) params[m[1]] = decodeURIComponent(c[i]);
	});
	const file = t.map((p) => p.replace(/^\{(.+)\}$/, '[$1]')).join('/');
	return { file, params };
}

const validators = new Map<string, ValidateFunction>();
const covered = new Map<string, Set<number>>();
const answers: string[] = [];

async function call(
	method: Method,
	template: string,
	concrete: string,
	opts: Call = {}
): Promise<{ status: number; body: Record<string, unknown> }> {
	const { file, params } = resolve(template, concrete);
	const mod = await import(/* @vite-ignore */ `../../src/routes/api/v1/${file}/+server.ts`);
	const url = new URL(`${ORIGIN}/api/v1${concrete}`);
	const headers = new Headers();
	const token = opts.token === undefined ? tokens.plant : opts.token;
	if (token) headers.set('authorization', `Bearer ${token}`);
	let body: string | undefined;
	if (opts.body !== undefined) {
		headers.set('content-type', opts.contentType ?? 'application/json');
		body = typeof opts.body === 'string' ? opts.body : JSON.stringify(opts.body);
	}
	const request = new Request(url, { method, headers, body });
	const res: Response = await mod[method]({
		url,
		params,
		request,
		locals: { user: null, session: null },
		route: { id: `/api/v1/${file}` }
	});
	const text = await res.text();
	if (template !== '/openapi.json') answers.push(text);
	const parsed = JSON.parse(text);
	checkAgainstDocument(method, template, res.status, res.headers.get('content-type'), parsed);
	return { status: res.status, body: parsed };
}

function checkAgainstDocument(
	method: Method,
	template: string,
	status: number,
	contentType: string | null,
	body: unknown
) {
	const key = `${method.toLowerCase()} ${template}`;
	const operation = (
		OPENAPI_DOCUMENT.paths as Record<string, Record<string, { responses: Record<string, unknown> }>>
	)[template]?.[method.toLowerCase()];
	expect(operation, `${key} is described`).toBeDefined();
	const response = operation.responses[String(status)] as
		{ content?: Record<string, { schema: object }> } | undefined;
	expect(response, `${key} answered ${status}, which the description does not list`).toBeDefined();
	expect(contentType).toContain('application/json');
	const pointer = `${key}#${status}`;
	let validate = validators.get(pointer);
	if (!validate) {
		validate = ajv.compile(rewriteRefs(response!.content!['application/json'].schema));
		validators.set(pointer, validate);
	}
	const ok = validate(body);
	expect(
		ok,
		`${key} ${status} does not match the description: ${JSON.stringify(validate.errors?.slice(0, 3))}\n${JSON.stringify(body).slice(0, 400)}`
	).toBe(true);
	covered.set(key, (covered.get(key) ?? new Set()).add(status));
}

// Ajv holds the document's component schemas under ids of their own; `#/components/schemas/X`
// in the document points at them.
const COMPONENT_BASE = 'https://castellan.invalid/components/';
function rewriteRefs<T>(schema: T): T {
	return JSON.parse(
		JSON.stringify(schema).replaceAll('"#/components/schemas/', `"${COMPONENT_BASE}`)
	);
}
const ajv = new Ajv2020({ strict: true, allowUnionTypes: true, allErrors: true });
addFormats.default(ajv);
for (const [name, schema] of Object.entries(OPENAPI_DOCUMENT.components.schemas)) {
	ajv.addSchema(rewriteRefs(schema as object), `${COMPONENT_BASE}${name}`);
}

const day = (offset: number) =>
	new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);

/** A demo press the die can run on from `start`, found by asking the order check itself. */
async function pressFor(die: string, start: string): Promise<string> {
	for (const p of ['CC-160', 'CC-84', 'CC-40', 'CC-25B', 'HC-42M', 'HC-20', 'HC-08']) {
		const check = await call(
			'GET',
			'/dies/{number}/order-check',
			`/dies/${die}/order-check?parts=100&press=${p}&from=${start}&shotsPerHour=100`
		);
		if (check.body.verdict !== 'blocked') return p;
	}
	return '';
}

interface BookingAnswer {
	id: number;
	press: string;
	startsAt: string;
	endsAt: string;
	endReason?: string | null;
}

// ---- the tests --------------------------------------------------------------------------------

describe('the OpenAPI description', () => {
	test('is a valid OpenAPI 3.1 document', async () => {
		const result = await new Validator().validate(structuredClone(OPENAPI_DOCUMENT) as never);
		expect(result.errors ?? []).toEqual([]);
		expect(result.valid).toBe(true);
		expect(OPENAPI_DOCUMENT.openapi).toMatch(/^3\.1\./);
	});

	test('names every /api/v1 route and method on disk, and nothing else', () => {
		const described = Object.entries(OPENAPI_DOCUMENT.paths)
			.flatMap(([p, ops]) => Object.keys(ops).map((m) => `${m} ${p}`))
			.sort();
		expect(described).toEqual(routesOnDisk());
	});

	test('is served at /api/v1/openapi.json to any valid caller, not to anonymous ones', async () => {
		// A token with a single, unrelated scope still reads it: every client needs it.
		const served = await call('GET', '/openapi.json', '/openapi.json', { token: tokens.writer });
		expect(served.status).toBe(200);
		expect(served.body).toEqual(JSON.parse(JSON.stringify(OPENAPI_DOCUMENT)));
		expect((await call('GET', '/openapi.json', '/openapi.json', { token: null })).status).toBe(401);
		expect(
			(await call('GET', '/openapi.json', '/openapi.json', { token: 'cst_not-a-token' })).status
		).toBe(401);
	});
});

describe('real answers match the description', () => {
	test('GET /dies: plant, owner, no credentials, wrong scope', async () => {
		const all = await call('GET', '/dies', '/dies?size=200');
		expect(all.status).toBe(200);
		const dies = all.body.dies as { number: string; partNumber: string | null }[];
		expect(dies.length).toBe(all.body.total);
		// Issue 15 item 5: the API list carries part numbers (the demo gives every die one).
		expect(dies.every((d) => typeof d.partNumber === 'string' && d.partNumber.length > 0)).toBe(
			true
		);
		const mine = await call('GET', '/dies', '/dies?sort=partNumber', { token: tokens.owner });
		expect(mine.status).toBe(200);
		expect((await call('GET', '/dies', '/dies', { token: null })).status).toBe(401);
		expect((await call('GET', '/dies', '/dies', { token: tokens.writer })).status).toBe(403);
	});

	test('GET /dies/{number}: found, another owner’s, missing', async () => {
		const own = await call('GET', '/dies/{number}', `/dies/${ownerDie}`);
		expect(own.status).toBe(200);
		expect(own.body.partNumber).toMatch(/^BRK-\d+$/);
		expect(
			(await call('GET', '/dies/{number}', `/dies/${ownerDie}`, { token: tokens.owner })).status
		).toBe(200);
		expect(
			(await call('GET', '/dies/{number}', `/dies/${otherOwnerDie}`, { token: tokens.owner }))
				.status
		).toBe(404);
		expect((await call('GET', '/dies/{number}', '/dies/D-9999')).status).toBe(404);
		expect((await call('GET', '/dies/{number}', '/dies/D-9999', { token: null })).status).toBe(401);
	});

	test('GET /dies/{number}/order-check: defaults equal the page’s; errors', async () => {
		const t = '/dies/{number}/order-check';
		const die = await db
			.selectFrom('dies')
			.select('cavities')
			.where('number', '=', ownerDie)
			.executeTakeFirstOrThrow();
		// No scrapPct and no shotsPerHour: 2 % scrap and the run's default rate.
		const plain = await call('GET', t, `/dies/${ownerDie}/order-check?parts=980`);
		expect(plain.status).toBe(200);
		// By hand: 980 good parts at 2 % scrap are 980 / 0.98 = 1000 castings, over the die's
		// cavities ⌈1000 / cavities⌉ shots.
		expect(plain.body.shotsNeeded).toBe(Math.ceil(1000 / die.cavities));
		expect(plain.body.rateIsDefault).toBe(true);
		const explicit = await call('GET', t, `/dies/${ownerDie}/order-check?parts=980&scrapPct=2`);
		expect(explicit.body.shotsNeeded).toBe(plain.body.shotsNeeded);
		const rated = await call('GET', t, `/dies/${ownerDie}/order-check?parts=980&shotsPerHour=90`);
		expect(rated.body).toMatchObject({ shotsPerHour: 90, rateIsDefault: false });
		expect(
			(await call('GET', t, `/dies/${ownerDie}/order-check?parts=980&press=CC-160`)).body.press
		).toBe('CC-160');
		expect(
			(await call('GET', t, `/dies/${ownerDie}/order-check?parts=1000`, { token: tokens.owner }))
				.status
		).toBe(200);
		const bad = await call('GET', t, `/dies/${ownerDie}/order-check?parts=lots`);
		expect(bad.status).toBe(400);
		expect(bad.body.issues).toEqual([expect.objectContaining({ field: 'parts' })]);
		expect((await call('GET', t, `/dies/${ownerDie}/order-check?parts=5&press=NOPE`)).status).toBe(
			400
		);
		expect((await call('GET', t, '/dies/D-9999/order-check?parts=5')).status).toBe(404);
		expect(
			(await call('GET', t, `/dies/${ownerDie}/order-check?parts=5`, { token: null })).status
		).toBe(401);
	});

	test('the order-check page and the API give the same shots and rate without scrap or rate', async () => {
		const { load } = await import('../../src/routes/order-check/+page.server');
		const u = await db
			.selectFrom('users')
			.selectAll()
			.where('role', '=', 'scheduler')
			.executeTakeFirstOrThrow();
		const url = new URL(`${ORIGIN}/order-check?die=${ownerDie}&parts=980`);
		const page = (await load({
			url,
			params: {},
			locals: { user: { ...u, customerId: u.customer_id, unitSystem: u.unit_system } },
			request: new Request(url),
			route: { id: '/order-check' }
		} as never)) as {
			answer: { shotsNeeded: number; shotsPerHour: number; rateIsDefault: boolean };
		};
		const api = await call(
			'GET',
			'/dies/{number}/order-check',
			`/dies/${ownerDie}/order-check?parts=980`
		);
		expect(page.answer.shotsNeeded).toBe(api.body.shotsNeeded);
		expect(page.answer.shotsPerHour).toBe(api.body.shotsPerHour);
		expect(page.answer.rateIsDefault).toBe(true);
	});

	test('GET /board and GET /bookings', async () => {
		const board = await call('GET', '/board', '/board');
		expect(board.status).toBe(200);
		// The plant reads the verdict on every bar and its first reason.
		const bars = board.body.bookings as { columns: string[]; rows: unknown[][] };
		expect(bars.columns.slice(-2)).toEqual(['verdict', 'why']);
		expect(bars.rows.some((r) => r[bars.columns.indexOf('verdict')] !== null)).toBe(true);
		const owners = await call('GET', '/board', '/board?days=56', { token: tokens.owner });
		expect(owners.status).toBe(200);
		// A tooling owner never reads the order, the verdict or why.
		const ownerColumns = (owners.body.bookings as { columns: string[] }).columns;
		for (const c of ['order', 'verdict', 'why']) expect(ownerColumns).not.toContain(c);
		expect((await call('GET', '/board', '/board', { token: null })).status).toBe(401);
		const list = await call('GET', '/bookings', `/bookings?from=${day(-30)}&to=${day(60)}`);
		expect(list.status).toBe(200);
		expect((list.body.bookings as unknown[]).length).toBeGreaterThan(0);
		expect(
			(
				await call('GET', '/bookings', `/bookings?from=${day(-30)}&to=${day(60)}`, {
					token: tokens.owner
				})
			).status
		).toBe(200);
		expect((await call('GET', '/bookings', '/bookings?from=soon')).status).toBe(400);
		expect((await call('GET', '/bookings', '/bookings', { token: tokens.writer })).status).toBe(
			403
		);
	});

	test('POST /bookings: booked, warnings to confirm, blocked, incomplete, wrong type, scope', async () => {
		// A slot far ahead that nothing else uses, on a press the die fits on.
		const start = `${day(500)}T06:00`;
		const press = await pressFor(ownerDie, start);
		expect(press, 'a demo press can run the die').not.toBe('');
		// No endsAt: the end is worked out (die change + preheat + press hours).
		const order = { die: ownerDie, press, startsAt: start, orderRef: 'PO-OPENAPI-1', parts: 100 };
		// A rate far above the alloy's usual range is a warning: the API asks to confirm first.
		const unusual = await call('POST', '/bookings', '/bookings', {
			body: { ...order, shotsPerHour: 5000 }
		});
		expect(unusual.status).toBe(409);
		expect(unusual.body.issues).toEqual(
			expect.arrayContaining([expect.objectContaining({ field: 'rate_unusual' })])
		);
		// An end other than the worked-out one needs a reason…
		const ownEnd = `${day(500)}T18:00`;
		const noReason = await call('POST', '/bookings', '/bookings', {
			body: { ...order, shotsPerHour: 5000, endsAt: ownEnd, confirm: true }
		});
		expect(noReason.status).toBe(400);
		expect(noReason.body.issues).toEqual([expect.objectContaining({ field: 'endReason' })]);
		// …and with one it is booked to that end, the reason kept.
		const made = await call('POST', '/bookings', '/bookings', {
			body: {
				...order,
				shotsPerHour: 5000,
				endsAt: ownEnd,
				endReason: 'Booked to the end of the shift',
				confirm: true
			}
		});
		expect(made.status).toBe(201);
		const booked = made.body.booking as BookingAnswer;
		expect(booked.press).toBe(press);
		expect(booked.endsAt).toBe(toUtcIso(ownEnd));
		expect(booked.endReason).toBe('Booked to the end of the shift');
		expect(made.body.verdict).toBe('warning');
		expect((made.body.warnings as string[]).length).toBeGreaterThan(0);
		// The same die again in the same window is double-booked: refused, whatever confirm says.
		const again = await call('POST', '/bookings', '/bookings', {
			body: { ...order, orderRef: 'PO-OPENAPI-2', confirm: true }
		});
		expect(again.status).toBe(422);
		expect((await call('POST', '/bookings', '/bookings', { body: { die: ownerDie } })).status).toBe(
			400
		);
		expect(
			(
				await call('POST', '/bookings', '/bookings', {
					body: { ...order, press: 'NOPE', confirm: true }
				})
			).status
		).toBe(400);
		expect(
			(await call('POST', '/bookings', '/bookings', { body: 'die=x', contentType: 'text/plain' }))
				.status
		).toBe(415);
		expect(
			(await call('POST', '/bookings', '/bookings', { body: order, token: tokens.reader })).status
		).toBe(403);
	});

	test('PATCH /bookings/{id}: moved, warnings to confirm, blocked, bad body, unknown, gone, scope', async () => {
		const t = '/bookings/{id}';
		const start = `${day(600)}T06:00`;
		const press = await pressFor(ownerDie, start);
		expect(press, 'a demo press can run the die').not.toBe('');
		const order = { die: ownerDie, press, orderRef: 'PO-OPENAPI-MOVE', parts: 100 };
		// The booking to move (an unusual rate: a warning, confirmed) and another run of the same
		// die further on, to move onto.
		const made = await call('POST', '/bookings', '/bookings', {
			body: { ...order, startsAt: start, shotsPerHour: 5000, confirm: true }
		});
		expect(made.status).toBe(201);
		const id = (made.body.booking as BookingAnswer).id;
		const later = `${day(620)}T06:00`;
		expect(
			(
				await call('POST', '/bookings', '/bookings', {
					body: { ...order, startsAt: later, orderRef: 'PO-OPENAPI-LATER', confirm: true }
				})
			).status
		).toBe(201);

		// Moved a day on: the warning still stands, so first the API asks to confirm…
		const moveTo = `${day(601)}T06:00`;
		const unconfirmed = await call('PATCH', t, `/bookings/${id}`, { body: { startsAt: moveTo } });
		expect(unconfirmed.status).toBe(409);
		expect(unconfirmed.body.issues).toEqual(
			expect.arrayContaining([expect.objectContaining({ field: 'rate_unusual' })])
		);
		// …and with confirm the booking moves, its end worked out again from the new start.
		const moved = await call('PATCH', t, `/bookings/${id}`, {
			body: { startsAt: moveTo, confirm: true }
		});
		expect(moved.status).toBe(200);
		const after = moved.body.booking as BookingAnswer;
		const before = made.body.booking as BookingAnswer;
		expect(after).toMatchObject({ id, press, startsAt: toUtcIso(moveTo), endReason: null });
		expect(Date.parse(after.endsAt) - Date.parse(after.startsAt)).toBe(
			Date.parse(before.endsAt) - Date.parse(before.startsAt)
		);
		expect(moved.body.changed).toEqual(['start', 'end']);
		expect(moved.body.verdict).toBe('warning');
		// The same change again changes nothing.
		const same = await call('PATCH', t, `/bookings/${id}`, {
			body: { startsAt: moveTo, confirm: true }
		});
		expect(same.status).toBe(200);
		expect(same.body.changed).toEqual([]);

		// Onto the die's other run: blocked, whatever confirm says.
		const blocked = await call('PATCH', t, `/bookings/${id}`, {
			body: { startsAt: later, confirm: true }
		});
		expect(blocked.status).toBe(422);
		expect(blocked.body.issues).toEqual(
			expect.arrayContaining([expect.objectContaining({ field: 'die_double_booked' })])
		);

		// Bad bodies: an end of its own without a reason, a field that cannot change, a bad value,
		// not an object, not JSON, not application/json.
		const noReason = await call('PATCH', t, `/bookings/${id}`, {
			body: { endsAt: `${day(601)}T20:00`, confirm: true }
		});
		expect(noReason.status).toBe(400);
		expect(noReason.body.issues).toEqual([expect.objectContaining({ field: 'endReason' })]);
		expect((await call('PATCH', t, `/bookings/${id}`, { body: { die: 'D-0102' } })).status).toBe(
			400
		);
		const badParts = await call('PATCH', t, `/bookings/${id}`, { body: { parts: 'lots' } });
		expect(badParts.status).toBe(400);
		expect(badParts.body.issues).toEqual([expect.objectContaining({ field: 'parts' })]);
		expect((await call('PATCH', t, `/bookings/${id}`, { body: [{ parts: 5 }] })).status).toBe(400);
		expect(
			(
				await call('PATCH', t, `/bookings/${id}`, {
					body: '{"parts":',
					contentType: 'application/json'
				})
			).status
		).toBe(400);
		expect(
			(await call('PATCH', t, `/bookings/${id}`, { body: 'parts=5', contentType: 'text/plain' }))
				.status
		).toBe(415);

		// Unknown ids, another owner's booking, a booking that has ended.
		expect((await call('PATCH', t, '/bookings/999999', { body: { notes: 'x' } })).status).toBe(404);
		expect((await call('PATCH', t, '/bookings/abc', { body: { notes: 'x' } })).status).toBe(404);
		const others = await db
			.selectFrom('press_bookings as b')
			.innerJoin('dies', 'dies.id', 'b.die_id')
			.innerJoin('customers', 'customers.id', 'dies.customer_id')
			.select('b.id')
			.where('customers.code', '!=', 'BRKPUMP')
			.where('b.cancelled_at', 'is', null)
			.where('b.ends_at', '>', new Date().toISOString())
			.executeTakeFirstOrThrow();
		expect(
			(
				await call('PATCH', t, `/bookings/${others.id}`, {
					body: { notes: 'x' },
					token: tokens.ownerBooker
				})
			).status
		).toBe(404);
		const ended = await db
			.selectFrom('press_bookings')
			.select('id')
			.where('cancelled_at', 'is', null)
			.where('ends_at', '<', new Date().toISOString())
			.executeTakeFirstOrThrow();
		const gone = await call('PATCH', t, `/bookings/${ended.id}`, { body: { notes: 'late' } });
		expect(gone.status).toBe(409);
		expect(gone.body.issues).toBeUndefined();

		// Credentials and scope.
		expect(
			(await call('PATCH', t, `/bookings/${id}`, { body: { notes: 'x' }, token: null })).status
		).toBe(401);
		expect(
			(await call('PATCH', t, `/bookings/${id}`, { body: { notes: 'x' }, token: tokens.reader }))
				.status
		).toBe(403);
	});

	test('GET /presses/{press}/mounted', async () => {
		const t = '/presses/{press}/mounted';
		const mounted = await call('GET', t, '/presses/cc-160/mounted');
		expect(mounted.status).toBe(200);
		expect(mounted.body.press).toBe('CC-160');
		expect((await call('GET', t, '/presses/NOPE/mounted')).status).toBe(404);
		expect((await call('GET', t, '/presses/CC-160/mounted', { token: tokens.reader })).status).toBe(
			403
		);
	});

	test('POST /shots: counted, repeated key, conflicting key, machine alias, errors', async () => {
		const t = '/shots';
		const key = 'openapi-shots-1';
		const entry = { die: ownerDie, shots: 40, press: 'CC-160', key };
		const first = await call('POST', t, t, { body: entry });
		expect(first.status).toBe(201);
		expect(first.body).toMatchObject({ accepted: 1, duplicates: 0 });
		const repeat = await call('POST', t, t, { body: [entry] });
		expect(repeat.body).toMatchObject({ accepted: 0, duplicates: 1 });
		const conflict = await call('POST', t, t, { body: { ...entry, shots: 41 } });
		expect(conflict.status).toBe(409);
		expect(conflict.body.original).toMatchObject({ shots: 40 });
		// `machine`, the press's old name, is still read on input for one release…
		const alias = await call('POST', t, t, {
			body: { die: ownerDie, shots: 5, machine: 'CC-160', key: 'openapi-shots-alias' }
		});
		expect(alias.status).toBe(201);
		const fed = await call('GET', '/presses/{press}/mounted', '/presses/CC-160/mounted');
		expect(fed.body).toMatchObject({ die: ownerDie });
		// …and refused when it contradicts press.
		const both = await call('POST', t, t, {
			body: { die: ownerDie, shots: 5, press: 'CC-160', machine: 'CC-84' }
		});
		expect(both.status).toBe(400);
		expect(both.body.issues).toEqual([expect.objectContaining({ field: 'machine' })]);
		expect((await call('POST', t, t, { body: { die: 'D-9999', shots: 5 } })).status).toBe(404);
		// An unknown press is reported under the name the caller used for it.
		const noPress = await call('POST', t, t, { body: { die: ownerDie, shots: 5, press: 'NOPE' } });
		expect(noPress.status).toBe(400);
		expect(noPress.body.issues).toEqual([expect.objectContaining({ field: 'press' })]);
		const oldName = await call('POST', t, t, {
			body: { die: ownerDie, shots: 5, machine: 'NOPE' }
		});
		expect(oldName.body.issues).toEqual([expect.objectContaining({ field: 'machine' })]);
		const batch = await call('POST', t, t, { body: [{ die: ownerDie, shots: -1 }, { die: 7 }] });
		expect(batch.status).toBe(400);
		expect((batch.body.issues as { index: number }[]).map((i) => i.index)).toContain(1);
		expect((await call('POST', t, t, { body: [] })).status).toBe(400);
		expect(
			(await call('POST', t, t, { body: '{"die":', contentType: 'application/json' })).status
		).toBe(400);
		expect((await call('POST', t, t, { body: 'x', contentType: 'text/csv' })).status).toBe(415);
		expect((await call('POST', t, t, { body: entry, token: tokens.reader })).status).toBe(403);
	});

	test('every described route was answered with a success and an error, all in one vocabulary', () => {
		for (const [p, ops] of Object.entries(OPENAPI_DOCUMENT.paths)) {
			for (const m of Object.keys(ops)) {
				const seen = [...(covered.get(`${m} ${p}`) ?? [])];
				expect(
					seen.some((s) => s < 300),
					`${m} ${p} success checked`
				).toBe(true);
				expect(
					seen.some((s) => s >= 400),
					`${m} ${p} error checked`
				).toBe(true);
			}
		}
		// `press` everywhere: no answer names a field `machine`.
		expect(answers.filter((a) => a.includes('"machine":'))).toEqual([]);
	});
});
