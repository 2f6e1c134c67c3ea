import { toPlantInput } from '../../src/lib/plant-time';
import { isPostgresUrl, newTestDatabaseTarget } from '../../src/lib/server/db/connect';
// The order-check page, its API and the booking form give the same verdict for every die of the
// demo plant and three order sizes — called through the real load function, endpoint and form
// action, on a file database seeded with the demo scenario.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { isActionFailure, isRedirect } from '@sveltejs/kit';
import { afterAll, beforeAll, describe, expect, test, vi } from 'vitest';
import { seedDemo } from '../../scripts/lib/demo-scenario';
import { folderPhotoStore } from '../../src/lib/server/photos/folder-store';
import { migrateToLatest, openDatabase, type DB } from '../../src/lib/server/db/connect';

// The app reads its settings from $env/dynamic/private; here they come from this process.
vi.mock('$env/dynamic/private', () => ({ env: process.env }));

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-verdicts-'));
process.env.DATABASE_PATH = path.join(dir, 'castellan.db');
process.env.UPLOAD_DIR = path.join(dir, 'uploads');
fs.mkdirSync(process.env.UPLOAD_DIR);

let db: DB;
let planner: App.Locals['user'];

beforeAll(async () => {
	// On the PostgreSQL pass the app's own handle (getDb) opens a fresh schema through DATABASE_URL.
	const target = await newTestDatabaseTarget(process.env.DATABASE_PATH!);
	if (isPostgresUrl(target)) process.env.DATABASE_URL = target;
	const seedDb = openDatabase(target);
	await migrateToLatest(seedDb);
	await seedDemo(seedDb, new Date(), folderPhotoStore(process.env.UPLOAD_DIR!));
	await seedDb.destroy();
	// The app's own handle (getDb) opens the same file on first use.
	const { getDb } = await import('../../src/lib/server/db');
	db = getDb();
	const u = await db
		.selectFrom('users')
		.selectAll()
		.where('role', '=', 'scheduler')
		.executeTakeFirstOrThrow();
	planner = {
		id: u.id,
		email: u.email,
		name: u.name,
		role: u.role,
		customerId: u.customer_id,
		unitSystem: u.unit_system
	} as unknown as App.Locals['user'];
	// Seeding the demo plant takes about two minutes on PostgreSQL (one round trip per statement).
}, 300_000);

afterAll(async () => {
	await db?.destroy();
	delete process.env.DATABASE_URL;
	fs.rmSync(dir, { recursive: true, force: true });
});

const ORIGIN = 'http://castellan.test';
// eslint-disable-next-line @typescript-eslint/no-explicit-any
const event = (url: URL, extra: Record<string, unknown> = {}): any => ({
	url,
	params: {},
	locals: { user: planner, session: null },
	request: new Request(url),
	route: { id: null },
	...extra
});

type Verdict = 'fits' | 'warning' | 'blocked';

async function pageVerdict(die: string, parts: number, press: string, from: string) {
	const { load } = await import('../../src/routes/order-check/+page.server');
	const url = new URL(`${ORIGIN}/order-check`);
	url.search = new URLSearchParams({ die, parts: String(parts), press, from }).toString();
	// eslint-disable-next-line @typescript-eslint/no-explicit-any
	const data = (await load(event(url))) as any;
	return { verdict: data.answer?.verdict as Verdict, until: data.answer?.endsAt as string };
}

async function apiVerdict(die: string, parts: number, press: string, from: string) {
	const { GET } = await import('../../src/routes/api/v1/dies/[number]/order-check/+server');
	const url = new URL(`${ORIGIN}/api/v1/dies/${die}/order-check`);
	url.search = new URLSearchParams({ parts: String(parts), press, from }).toString();
	const res = await GET(event(url, { params: { number: die } }));
	expect(res.status).toBe(200);
	const body = await res.json();
	return { verdict: body.verdict as Verdict, until: body.until as string };
}

/** The booking form's check: booked → fits, asked to confirm warnings → warning, refused → blocked. */
async function bookingFormVerdict(
	die: string,
	parts: number,
	press: string,
	from: string,
	until: string
): Promise<Verdict> {
	const { actions } = await import('../../src/routes/bookings/new/+page.server');
	const body = new FormData();
	body.set('die', die);
	body.set('press', press);
	// The same start as the page's question (plant time).
	body.set('startsAt', toPlantInput(from));
	// No end: the form works it out (die change + preheat + press hours), as the page did.
	body.set('orderRef', `PO-CHECK-${die}-${parts}`);
	body.set('parts', String(parts));
	const url = new URL(`${ORIGIN}/bookings/new`);
	try {
		// The form first shows the worked-out run back and saves nothing (a blocked run is refused
		// at once, with the run); the second send, with the end that was shown, is the booking itself.
		type Answer = {
			form: {
				data: { shownEndsAt: string };
				message?: { kind: string; plan?: { endsAt: string } };
			};
		};
		const first = await actions.default(
			event(url, { request: new Request(url, { method: 'POST', body }) })
		);
		const shown = (isActionFailure(first) ? first.data : first) as unknown as Answer;
		// The end the form shows back is the end the order-check page worked out.
		expect(shown.form.message?.plan?.endsAt).toBe(until);
		if (isActionFailure(first)) {
			expect(shown.form.message?.kind).toBe('blocked');
			return 'blocked';
		}
		expect(shown.form.message?.kind).toBe('review');
		body.set('shownEndsAt', shown.form.data.shownEndsAt);
		const request = new Request(url, { method: 'POST', body });
		const result = await actions.default(event(url, { request }));
		if (isActionFailure(result)) {
			const kind = (result.data as unknown as Answer).form.message?.kind;
			if (kind === 'confirm') return 'warning';
		}
		throw new Error(`Unexpected booking form answer: ${JSON.stringify(result)}`);
	} catch (thrown) {
		if (!isRedirect(thrown)) throw thrown;
		// Booked: the check found nothing. Cancel it so the next question sees a free slot.
		const id = Number(/\/bookings\/(\d+)/.exec(thrown.location)![1]);
		await db
			.updateTable('press_bookings')
			.set({ cancelled_at: new Date().toISOString(), cancel_reason: 'test' })
			.where('id', '=', id)
			.execute();
		return 'fits';
	}
}

describe('one verdict on every surface', () => {
	test('page, API and booking form agree for every demo die and three order sizes', async () => {
		const dies = await db
			.selectFrom('dies')
			.select(['number', 'process'])
			.orderBy('number')
			.execute();
		const presses = await db
			.selectFrom('machines')
			.select(['name', 'chamber', 'clamp_force_kn'])
			.orderBy('clamp_force_kn')
			.execute();
		expect(dies.length).toBeGreaterThan(40);
		// 06:00 UTC in 45 days, past the demo's booked weeks (a whole minute, as the form keeps it).
		const from = new Date(
			Date.parse(new Date().toISOString().slice(0, 10)) + (45 * 24 + 6) * 3_600_000
		).toISOString();
		const seen = new Map<Verdict, number>();
		for (const [i, die] of dies.entries()) {
			const chamber = die.process === 'hot_chamber' ? 'hot' : 'cold';
			const mine = presses.filter((p) => p.chamber === chamber);
			// Alternate the smallest and the largest press of the die's chamber.
			const press = (i % 2 ? mine[0] : mine[mine.length - 1]).name;
			for (const parts of [100, 5_000, 200_000]) {
				// The page's start field is plant time (the demo plant runs on Vienna time).
				const page = await pageVerdict(die.number, parts, press, toPlantInput(from));
				const api = await apiVerdict(die.number, parts, press, from);
				expect(api, `${die.number} × ${parts} on ${press}`).toEqual(page);
				const form = await bookingFormVerdict(die.number, parts, press, from, page.until);
				expect(form, `${die.number} × ${parts} on ${press}: booking form`).toBe(page.verdict);
				seen.set(page.verdict, (seen.get(page.verdict) ?? 0) + 1);
			}
		}
		// The demo plant shows every verdict.
		expect([...seen.keys()].sort()).toEqual(['blocked', 'fits', 'warning']);
	}, 300_000);
});
