// Hostile input, table-driven: markup, PDF and spreadsheet tricks, awkward unicode, NUL, very long
// text and number-like strings go into the text fields of the app; each is refused with a clear
// 4xx message or stored and shown as text everywhere it appears (pages, CSV, the owner's PDF).
// Then the shots API and the job photo upload get malformed, oversized and tricky requests.
// Uses only what it creates: customer HST950, press HX-950 and die D-0950 (with its jobs and
// bookings). The e-mails are covered by tests/integration/hostile-mail.test.ts.
import fs from 'node:fs';
import path from 'node:path';
import { expect, test, type APIResponse, type Browser, type Page } from '@playwright/test';
import { makeTestJpeg, pdfText } from './owner-support';
import { signIn } from './support';

test.describe.configure({ mode: 'serial' });

const DIE = 'D-0950';
const CUSTOMER_CODE = 'HST950';
const PRESS = 'HX-950';
const OWNER_EMAIL = 'hostile950@evil.test';
const OWNER_PASSWORD = 'hostile-owner-pass-950';

interface Payload {
	id: string;
	text: string;
}
const PAYLOADS: Payload[] = [
	{ id: 'script element', text: '<script>alert(1)</script>' },
	{ id: 'attribute break-out', text: '"><img src=x onerror=alert(1)>' },
	{ id: 'PDF string break-out', text: ') /JS (app.alert(1)) /S /JavaScript (' },
	{ id: 'spreadsheet formula', text: '=HYPERLINK("http://evil.test","open")' },
	{ id: 'right-to-left override', text: 'Gate \u202Eexe.tac\u202C insert' },
	{ id: 'zero-width joiner', text: 'Core\u200Dpin \u{1F469}\u200D\u{1F527}' },
	{ id: 'emoji', text: 'Pump housing \u{1F529}\u2699\uFE0F' },
	{ id: 'NUL', text: 'Cover\u0000half' },
	{ id: '10 000 characters', text: 'W'.repeat(10_000) },
	{ id: 'huge number', text: '1e308' },
	{ id: 'negative zero', text: '-0' },
	{ id: 'NaN', text: 'NaN' }
];
/** Names that end up everywhere: several payloads in one, within every name field's limit. */
const HOSTILE_NAME =
	'<script>alert(1)</script>"><img src=x onerror=alert(1)> ) /JS (app.alert(1)) ( \u202Ekcab\u202C 🔩';
const HOSTILE_PERSON = 'Mallory <img src=x onerror=alert(1)>';

/** Facts the setup learns and the later tests use. */
const state = { customerId: '', alloyId: '', pressId: '', ownerReady: false };

function dieForm(over: Record<string, string> = {}): Record<string, string> {
	return {
		number: DIE,
		partName: 'Hostile test housing',
		partNumber: '',
		customerId: state.customerId,
		alloyId: state.alloyId,
		process: 'cold_chamber',
		cavities: '1',
		projectedAreaCm2: '50',
		location: '',
		notes: '',
		expectedLifeShots: '',
		steel: 'H13',
		coverSerial: '',
		ejectorSerial: '',
		...over
	};
}
function pressForm(over: Record<string, string> = {}): Record<string, string> {
	return {
		name: PRESS,
		chamber: 'cold',
		clampForce: '20000',
		clampUnit: 'kN',
		maxShotWeight: '',
		tieBarSpacing: '',
		status: 'available',
		notes: '',
		...over
	};
}

/** Posts a form as a browser without JavaScript would (same origin, HTML wanted, no redirects). */
async function postForm(page: Page, url: string, form: Record<string, string>) {
	const origin = new URL(page.url()).origin;
	return page.request.post(url, {
		form,
		headers: { origin, accept: 'text/html' },
		maxRedirects: 0
	});
}

/** The messages a refused form shows: field errors, alerts, or the plain-text answer. */
function refusalMessages(res: APIResponse, body: string): string[] {
	if ((res.headers()['content-type'] ?? '').startsWith('text/plain')) return [body.trim()];
	const found = [
		...body.matchAll(/data-fs-field-error[^>]*>([^<]+)</g),
		...body.matchAll(/role="alert"[^>]*>([^<]+)</g)
	];
	return found.map((m) => m[1].trim()).filter(Boolean);
}

/** Svelte's escaping of text content: only & and < need it. */
const asHtmlText = (v: string) => v.replaceAll('&', '&amp;').replaceAll('<', '&lt;');

/** The value must be in the HTML as text, never as live markup. */
function expectEscaped(html: string, value: string, where: string) {
	if (/[<&]/.test(value)) {
		expect(html, `${where}: raw markup`).not.toContain(value);
		expect(html, `${where}: shown as text`).toContain(asHtmlText(value));
	} else {
		expect(html, `${where}: shown as stored`).toContain(value);
	}
}

/** The cell as csvResponse writes it: a formula start defused at the start of every line, quoted
 * when it holds a quote, comma, semicolon or line break. */
function csvCell(value: string): string {
	const v = (/^[=+\-@\t\r]/.test(value) ? `'${value}` : value).replace(
		/([\r\n])([=+\-@\t])/g,
		"$1'$2"
	);
	return /[",;\r\n]/.test(v) ? `"${v.replaceAll('"', '""')}"` : v;
}

async function expectPage(page: Page, url: string, value: string) {
	const res = await page.request.get(url);
	expect(res.status(), url).toBe(200);
	expectEscaped(await res.text(), value, url);
}

async function expectCsv(page: Page, url: string, value: string) {
	const res = await page.request.get(url);
	expect(res.status(), url).toBe(200);
	expect(res.headers()['content-type']).toContain('text/csv');
	const csv = await res.text();
	expect(csv, `${url}: cell`).toContain(csvCell(value));
	if (/^[=+\-@]/.test(value)) expect(csv, `${url}: formula defused`).not.toMatch(/(^|,)"?[=+@]/m);
}

interface Target {
	field: string;
	submit(page: Page, value: string, i: number): Promise<APIResponse>;
	/** Pages (HTML) and exports (CSV) that show the stored value; `res` is the answer. */
	shows(res: APIResponse): { pages: string[]; csv: string[] };
	/** Payloads that are valid values here and would only add ordinary records. */
	skip?: (text: string) => boolean;
}

const TARGETS: Target[] = [
	{
		field: 'die part name',
		submit: (page, value) => postForm(page, `/dies/${DIE}/edit`, dieForm({ partName: value })),
		shows: () => ({
			pages: [`/dies/${DIE}`, `/dies?q=${DIE}`],
			csv: [`/dies/export.csv?q=${DIE}`]
		})
	},
	{
		field: 'die notes',
		submit: (page, value) => postForm(page, `/dies/${DIE}/edit`, dieForm({ notes: value })),
		shows: () => ({ pages: [`/dies/${DIE}`], csv: [] })
	},
	{
		field: 'customer name (settings)',
		submit: (page, value) =>
			postForm(page, '/settings?/customer', {
				id: state.customerId,
				code: CUSTOMER_CODE,
				name: value,
				contactEmail: ''
			}),
		shows: () => ({
			pages: ['/settings', `/dies/${DIE}`, `/dies?q=${DIE}`],
			csv: [`/dies/export.csv?q=${DIE}`]
		})
	},
	{
		field: 'press notes',
		submit: (page, value) =>
			postForm(page, `/presses/${state.pressId}?/save`, pressForm({ notes: value })),
		shows: () => ({ pages: [`/presses/${state.pressId}`], csv: [] })
	},
	{
		field: 'press name',
		submit: (page, value) => postForm(page, '/presses/new', pressForm({ name: value })),
		shows: () => ({ pages: [], csv: [] }),
		// Letters and digits make a real press name ("NAN", "1E308"): not hostile, not created.
		skip: (text) => /^[A-Za-z0-9][A-Za-z0-9 -]{0,19}$/.test(text)
	},
	{
		field: 'booking order reference',
		submit: (page, value, i) => {
			// One day per payload, a few days ahead, so no booking overlaps another.
			const day = new Date(Date.now() + (3 + i) * 86_400_000).toISOString().slice(0, 10);
			return postForm(page, '/bookings/new', {
				die: DIE,
				press: PRESS,
				startsAt: `${day}T06:00`,
				endsAt: `${day}T14:00`,
				orderRef: value,
				parts: '100',
				scrapPct: '2',
				shotsPerHour: '',
				notes: value,
				confirmedWarnings: ''
			});
		},
		shows: (res) => ({
			pages: [res.headers().location!.split('?')[0], `/dies/${DIE}/bookings`],
			csv: []
		})
	},
	{
		field: 'toolroom job description',
		submit: (page, value) =>
			postForm(page, `/dies/${DIE}/jobs?/open`, {
				kind: 'repair',
				half: 'both',
				zone: '',
				description: value,
				assignedTo: '',
				dieToToolroom: 'true',
				noticeId: ''
			}),
		shows: (res) => ({
			pages: [res.headers().location!, `/dies/${DIE}/jobs`],
			csv: [`/jobs/export.csv?die=${DIE}`]
		})
	}
];

async function ownerPage(browser: Browser): Promise<Page> {
	const page = await (await browser.newContext()).newPage();
	await page.goto('/sign-in');
	await page.getByLabel('E-mail').fill(OWNER_EMAIL);
	await page.getByLabel('Password').fill(OWNER_PASSWORD);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).toHaveURL(/\/owner$/);
	return page;
}

/** Opens the page in the browser: no dialog may open and no injected element may exist. */
async function expectInert(page: Page, url: string, visible: string[]) {
	const dialogs: string[] = [];
	const onDialog = (d: { message(): string; dismiss(): Promise<void> }) => {
		dialogs.push(d.message());
		void d.dismiss();
	};
	page.on('dialog', onDialog);
	await page.goto(url);
	await expect(page.locator('main')).toBeVisible();
	await expect(page.locator('img[src="x"], [onerror], iframe'), url).toHaveCount(0);
	for (const v of visible) await expect(page.locator('body'), url).toContainText(v);
	page.off('dialog', onDialog);
	expect(dialogs, url).toEqual([]);
}

test('setup: a customer, a press and die D-0950 of our own, and the customer’s portal user', async ({
	page,
	browser
}) => {
	await signIn(page, 'admin');
	let res = await postForm(page, '/settings?/customer', {
		id: '',
		code: CUSTOMER_CODE,
		name: 'Hostile Test Works',
		contactEmail: ''
	});
	expect(res.status()).toBe(200);
	await page.goto('/dies/new');
	state.customerId = (await page
		.getByLabel('Owner')
		.locator('option', { hasText: `(${CUSTOMER_CODE})` })
		.getAttribute('value'))!;
	state.alloyId = (await page
		.getByLabel('Alloy')
		.locator('option', { hasText: 'A380' })
		.getAttribute('value'))!;
	expect(Number(state.customerId)).toBeGreaterThan(0);

	res = await postForm(page, '/dies/new', dieForm());
	expect(res.status(), await res.text().then((t) => t.slice(0, 300))).toBe(303);
	res = await postForm(page, '/presses/new', pressForm());
	expect(res.status()).toBe(303);
	state.pressId = res.headers().location!.split('/').pop()!;

	// The portal user, through an invitation (the e-mail cannot go out in e2e: the link is shown).
	res = await postForm(page, '/admin/invites?/create', {
		customerId: state.customerId,
		name: HOSTILE_PERSON,
		email: OWNER_EMAIL
	});
	expect(res.status()).toBe(200);
	const invite = await res.text();
	expectEscaped(invite, HOSTILE_PERSON, '/admin/invites');
	const link = /data-testid="invite-link">([^<]+)</.exec(invite)?.[1];
	expect(link).toMatch(/\/invite\//);
	const owner = await (await browser.newContext()).newPage();
	await owner.goto(new URL(link!).pathname);
	await owner.getByLabel('Password', { exact: true }).fill(OWNER_PASSWORD);
	await owner.getByLabel('Repeat the password').fill(OWNER_PASSWORD);
	await owner.getByRole('button', { name: 'Create my account' }).click();
	await expect(owner).toHaveURL(/\/owner$/);
	await expectInert(owner, '/owner', ['Mallory <img src=x onerror=alert(1)>']);
	await owner.context().close();
	state.ownerReady = true;
});

test('every text field refuses a payload with a clear message or stores it and shows it as text', async ({
	page
}) => {
	test.setTimeout(180_000);
	await signIn(page, 'admin');
	const outcomes: string[] = [];
	for (const target of TARGETS) {
		for (const [i, payload] of PAYLOADS.entries()) {
			if (target.skip?.(payload.text)) continue;
			const what = `${target.field} ← ${payload.id}`;
			const res = await target.submit(page, payload.text, i);
			const body = await res.text();
			expect(res.status(), `${what}: ${body.slice(0, 300)}`).toBeLessThan(500);
			const messages = refusalMessages(res, body);
			if (res.status() >= 400) {
				expect(res.status(), what).toBeLessThan(500);
				expect(
					messages,
					`${what}: refused without a message: ${res.headers()['content-type']} ${body.slice(0, 300)}`
				).not.toEqual([]);
				for (const m of messages) {
					// zod's own English ("Too big: expected string…") is not a message for people.
					expect(m, `${what}: unclear message`).not.toMatch(/^(Too big|Too small|Invalid)/);
				}
				outcomes.push(`${what}: refused (${res.status()}) "${messages[0]}"`);
				continue;
			}
			expect([200, 303], `${what}: ${body.slice(0, 300)}`).toContain(res.status());
			expect(messages, `${what}: stored yet shows errors`).toEqual([]);
			const shows = target.shows(res);
			for (const url of shows.pages) await expectPage(page, url, payload.text);
			for (const url of shows.csv) await expectCsv(page, url, payload.text);
			outcomes.push(`${what}: stored, shown as text`);
		}
	}
	// Every field refuses the NUL and the 10 000 characters; the press name refuses all of these.
	for (const target of TARGETS) {
		for (const id of ['NUL', '10 000 characters']) {
			const refused = outcomes.some((o) => o.startsWith(`${target.field} ← ${id}: refused`));
			expect(refused, `${target.field} ← ${id} refused`).toBe(true);
		}
	}
	await test.info().attach('outcomes', { body: outcomes.join('\n'), contentType: 'text/plain' });
});

test('number fields refuse huge, negative-zero, infinite and NaN values with a message', async ({
	page
}) => {
	await signIn(page, 'admin');
	// Not here: fields the schema declares as integers (cavities, expected life, parts). Superforms
	// reads those with parseInt before zod sees them, so "1e308" arrives as 1 and is stored; that
	// needs a change in every form schema and is reported rather than fixed here.
	const fields: [string, (v: string) => Promise<APIResponse>][] = [
		[
			'die projected area',
			(v) => postForm(page, `/dies/${DIE}/edit`, dieForm({ projectedAreaCm2: v }))
		],
		[
			'press clamping force',
			(v) => postForm(page, `/presses/${state.pressId}?/save`, pressForm({ clampForce: v }))
		]
	];
	for (const [field, submit] of fields) {
		for (const value of ['1e308', '-0', 'NaN', 'Infinity', '-1e308', '1e-400']) {
			const res = await submit(value);
			const body = await res.text();
			expect(res.status(), `${field} ← ${value}`).toBe(400);
			const messages = refusalMessages(res, body);
			expect(messages, `${field} ← ${value}`).not.toEqual([]);
			for (const m of messages) expect(m, `${field} ← ${value}`).not.toMatch(/^(Too|Invalid)/);
		}
	}
	// Nothing changed: the die keeps its 50 cm² and the press its 20 000 kN.
	expect(await (await page.request.get(`/dies/${DIE}`)).text()).toContain('50 cm²');
	expect(await (await page.request.get(`/presses/${state.pressId}`)).text()).toContain('20,000');
});

test('the hostile names stay text on every page, in the CSV exports and in the owner’s PDF', async ({
	page,
	browser
}) => {
	test.setTimeout(120_000);
	expect(state.ownerReady).toBe(true);
	await signIn(page, 'admin');
	const notes = PAYLOADS.filter((p) => !p.text.includes('\u0000') && p.text.length < 100)
		.map((p) => p.text)
		.join('\n');
	let res = await postForm(
		page,
		`/dies/${DIE}/edit`,
		dieForm({ partName: HOSTILE_NAME, partNumber: '"><b>', notes })
	);
	expect(res.status()).toBe(303);
	res = await postForm(page, '/settings?/customer', {
		id: state.customerId,
		code: CUSTOMER_CODE,
		name: HOSTILE_NAME,
		contactEmail: ''
	});
	expect(res.status()).toBe(200);

	// Close one job with hostile findings and a hostile summary shared with the owner.
	await page.goto(`/dies/${DIE}/jobs`);
	const jobs = await page
		.locator('a[href^="/jobs/TJ-"]')
		.evaluateAll((as) => as.map((a) => a.getAttribute('href')!));
	expect(jobs.length).toBeGreaterThan(0);
	res = await postForm(page, `${jobs[0]}?/close`, {
		findings: HOSTILE_NAME,
		workDone: '<script>alert(1)</script> polished',
		hours: '1',
		partsUsed: '"><img src=x onerror=alert(1)>',
		billableToOwner: 'true',
		ownerSummary: `Summary ${HOSTILE_NAME}`,
		summaryShared: 'true'
	});
	expect(res.status(), (await res.text()).slice(0, 300)).toBeLessThan(400);

	for (const url of [`/dies/${DIE}`, `/dies/${DIE}/edit`, `/dies?q=${DIE}`, '/settings', '/jobs']) {
		await expectPage(page, url, HOSTILE_NAME);
	}
	await expectPage(page, jobs[0], `Summary ${HOSTILE_NAME}`);
	await expectCsv(page, `/dies/export.csv?q=${DIE}`, HOSTILE_NAME);
	await expectCsv(page, `/jobs/export.csv?die=${DIE}`, HOSTILE_NAME);

	// In a real browser: nothing runs, nothing is injected, the text reads as typed.
	for (const url of [`/dies/${DIE}`, `/dies?q=${DIE}`, `/dies/${DIE}/jobs`, jobs[0], '/jobs']) {
		await expectInert(page, url, ['<script>alert(1)</script>"><img src=x onerror=alert(1)>']);
	}
	await expectInert(page, `/presses/${state.pressId}`, []);
	await expectInert(page, '/board', []);
	await expectInert(page, '/settings', []);

	// The owner: portal pages, CSV and the PDF statement.
	const owner = await ownerPage(browser);
	for (const url of ['/owner', `/owner/dies/${DIE}`]) {
		await expectPage(owner, url, HOSTILE_NAME);
		await expectInert(owner, url, ['<script>alert(1)</script>"><img src=x onerror=alert(1)>']);
	}
	await expectPage(owner, `/owner/dies/${DIE}`, `Summary ${HOSTILE_NAME}`);
	await expectCsv(owner, '/owner/export.csv', HOSTILE_NAME);

	const pdfRes = await owner.request.get('/owner/statement.pdf');
	expect(pdfRes.status()).toBe(200);
	expect(pdfRes.headers()['content-type']).toContain('application/pdf');
	const pdf = await pdfRes.body();
	expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
	const raw = pdf.toString('latin1');
	// No active content: no script, launch or open action, whatever the names said.
	expect(raw).not.toMatch(/\/(JavaScript|JS|Launch|OpenAction|AA)\s*[(<[/]/);
	const shown = pdfText(pdf);
	// The standard PDF fonts have no RTL override or emoji: those become '?'.
	expect(shown).toContain('<script>alert(1)</script>"><img src=x onerror=alert(1)>');
	expect(shown).toContain('Summary <script>alert(1)</script>');
	expect(shown).toContain(') /JS (app.alert(1)) ( ?kcab? ?');
	await owner.context().close();
});

test('a form sent by use:enhance gets the refusal as an action result', async ({ page }) => {
	await signIn(page, 'admin');
	const origin = new URL(page.url()).origin;
	const res = await page.request.post(`/presses/${state.pressId}?/save`, {
		form: pressForm({ notes: 'Seal\u0000ring' }),
		headers: { origin, accept: 'application/json', 'x-sveltekit-action': 'true' }
	});
	expect(res.status()).toBe(400);
	expect(await res.json()).toEqual({
		type: 'error',
		error: { message: expect.stringMatching(/may not contain control characters such as NUL/) }
	});
	expect(await (await page.request.get(`/presses/${state.pressId}`)).text()).not.toContain(
		'Seal\u0000ring'
	);
});

test('the shots API answers bad bodies with 4xx and a reason, and counts nothing', async ({
	page
}) => {
	await signIn(page, 'admin');
	const origin = new URL(page.url()).origin;
	const totalOf = async () =>
		((await (await page.request.get(`/api/v1/dies/${DIE}`)).json()) as { totalShots: number })
			.totalShots;
	const before = await totalOf();
	const entry = (shots: string) => Buffer.from(`{"die":"${DIE}","shots":${shots}}`);
	const cases: {
		name: string;
		body: Buffer;
		type?: string;
		status: number;
		error?: RegExp;
		issueField?: string;
	}[] = [
		{
			name: 'a body over 2 MB',
			body: Buffer.from(JSON.stringify({ die: DIE, shots: 1, key: 'k'.repeat(2_100_000) })),
			type: 'application/json',
			status: 413,
			error: /larger than 2 MB/
		},
		{
			name: 'a form body',
			body: Buffer.from(`die=${DIE}&shots=1`),
			type: 'application/x-www-form-urlencoded',
			status: 415,
			error: /application\/json/
		},
		{
			name: 'plain text',
			body: entry('1'),
			type: 'text/plain',
			status: 415,
			error: /application\/json/
		},
		{
			name: 'XML',
			body: Buffer.from('<shots die="D-0950">1</shots>'),
			type: 'application/xml',
			status: 415
		},
		{
			name: 'malformed JSON',
			body: Buffer.from(`{"die":"${DIE}","shots":`),
			type: 'application/json',
			status: 400,
			error: /not valid JSON/
		},
		{
			name: 'NaN literal',
			body: entry('NaN'),
			type: 'application/json',
			status: 400,
			error: /not valid JSON/
		},
		{
			name: 'a NUL in a string',
			body: Buffer.from(`{"die":"${DIE}","shots":1,"key":"a\\u0000b"}`),
			type: 'application/json',
			status: 400,
			error: /control characters/
		},
		{
			name: 'nesting 100 000 deep',
			body: Buffer.from('['.repeat(100_000) + ']'.repeat(100_000)),
			type: 'application/json',
			status: 400
		},
		{
			name: 'shots 1e308',
			body: entry('1e308'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'shots 1e309 (Infinity)',
			body: entry('1e309'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'shots above 2^53',
			body: entry('9007199254740993'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'negative shots',
			body: entry('-25'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'shots -0',
			body: entry('-0'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'fractional shots',
			body: entry('12.5'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'shots "NaN"',
			body: entry('"NaN"'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'shots as a string',
			body: entry('"12"'),
			type: 'application/json',
			status: 400,
			issueField: 'shots'
		},
		{
			name: 'markup as the press',
			body: Buffer.from(
				JSON.stringify({ die: DIE, shots: 1, machine: '<script>alert(1)</script>' })
			),
			type: 'application/json',
			status: 400,
			issueField: 'machine'
		},
		{
			name: 'a 10 000-character die number',
			body: Buffer.from(JSON.stringify({ die: 'D'.repeat(10_000), shots: 1 })),
			type: 'application/json',
			status: 400,
			issueField: 'die'
		}
	];
	for (const c of cases) {
		const res = await page.request.post('/api/v1/shots', {
			data: c.body,
			headers: { origin, ...(c.type ? { 'content-type': c.type } : {}) }
		});
		expect(res.status(), c.name).toBe(c.status);
		expect(res.headers()['content-type'], c.name).toContain('application/json');
		const answer = (await res.json()) as { error: string; issues?: { field: string }[] };
		expect(answer.error, c.name).toEqual(expect.any(String));
		expect(answer.error.length, c.name).toBeGreaterThan(5);
		if (c.error) expect(answer.error, c.name).toMatch(c.error);
		if (c.issueField) {
			expect(
				answer.issues?.map((i) => i.field),
				c.name
			).toContain(c.issueField);
		}
		expect(JSON.stringify(answer), c.name).not.toMatch(/at .+\.js:\d+/);
	}
	expect(await totalOf()).toBe(before);
	expect((await page.request.get('/sign-in')).status()).toBe(200);
});

test('photo uploads with path tricks in their names are stored under random names or refused', async ({
	page
}, info) => {
	await signIn(page, 'toolmaker');
	const res = await postForm(page, `/dies/${DIE}/jobs?/open`, {
		kind: 'surface_inspection',
		half: 'both',
		zone: '',
		description: 'Photos with awkward names',
		assignedTo: '',
		dieToToolroom: 'true',
		noticeId: ''
	});
	expect(res.status()).toBe(303);
	const job = res.headers().location!;
	const origin = new URL(page.url()).origin;
	const jpeg = await makeTestJpeg(950);
	const names = [
		'../../etc/passwd.jpg',
		'..\\..\\windows\\win.ini.jpg',
		'/etc/passwd',
		'a\u0000b.jpg',
		`${'n'.repeat(300)}.jpg`,
		'<img src=x onerror=alert(1)>.jpg',
		'photo.jpg\r\nX-Injected: 1'
	];
	let added = 0;
	for (const name of names) {
		const up = await page.request.post(`${job}?/upload`, {
			multipart: { photos: { name, mimeType: 'image/jpeg', buffer: jpeg }, caption: 'named oddly' },
			headers: { origin, accept: 'text/html' },
			maxRedirects: 0
		});
		const html = await up.text();
		expect(up.status(), `${JSON.stringify(name)}: ${html.slice(0, 200)}`).toBeLessThan(500);
		expect(html).not.toContain('<img src=x onerror');
		if (up.status() < 400) added++;
	}
	// A file that only claims to be a JPEG is refused by its content, whatever its name.
	const fake = await page.request.post(`${job}?/upload`, {
		multipart: {
			photos: {
				name: '../../passwd.jpg',
				mimeType: 'image/jpeg',
				buffer: Buffer.from('root:x:0:0')
			}
		},
		headers: { origin, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(fake.status()).toBe(400);
	expect(await fake.text()).toContain('this file is not an image');

	await page.goto(job);
	await expect(page.getByRole('heading', { name: `Photos (${added})` })).toBeVisible();
	expect(added).toBeGreaterThan(0);

	// On disk: only random names below photos/, nothing written elsewhere.
	const port = process.env.E2E_PORT ?? '4173';
	const uploads = path.resolve(`test-results/e2e-data-${port}/uploads`);
	const files = fs.readdirSync(uploads, { recursive: true, withFileTypes: true });
	for (const f of files.filter((e) => e.isFile())) {
		const rel = path.relative(uploads, path.join(f.parentPath, f.name));
		expect(rel).toMatch(/^photos\/[0-9a-f]{2}\/[0-9a-f]{32}(\.thumb)?\.jpg$/);
	}
	for (const escaped of ['test-results/etc/passwd.jpg', 'etc/passwd.jpg', 'passwd']) {
		expect(fs.existsSync(path.resolve(`test-results/e2e-data-${port}`, escaped))).toBe(false);
	}
	await page.screenshot({ path: info.outputPath('odd-photo-names.png'), fullPage: true });
});

test('30 parallel sign-ins to one account (29 wrong, 1 right): at most 5 reach the password check', async ({
	page,
	playwright
}) => {
	const email = 'race950@plant.test';
	const password = 'Race-950-horse-battery';
	await signIn(page, 'admin');
	const made = await postForm(page, '/admin/users?/create', {
		email,
		name: 'Race Nine-Fifty',
		role: 'scheduler',
		customerId: '',
		password
	});
	expect(made.status()).toBe(200);
	const base = new URL(page.url()).origin;
	// Thirty browsers at once, the right password sent last.
	const contexts = await Promise.all(
		Array.from({ length: 30 }, () => playwright.request.newContext({ baseURL: base }))
	);
	const answers = await Promise.all(
		contexts.map((ctx, i) =>
			ctx.post('/sign-in', {
				form: { email, password: i === 29 ? password : `wrong-${i}` },
				headers: { origin: base, accept: 'text/html' },
				maxRedirects: 0
			})
		)
	);
	const statuses = answers.map((a) => a.status());
	// 429 = refused before the verify. The limit is 5 per account, so at least 25 are refused.
	expect(statuses.filter((s) => s === 429).length, statuses.join(',')).toBeGreaterThanOrEqual(25);
	expect(statuses.filter((s) => s !== 429).length).toBeLessThanOrEqual(5);
	// Whatever happened to the right password, the account is now locked for a while.
	const after = await contexts[0].post('/sign-in', {
		form: { email, password },
		headers: { origin: base, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(after.status()).toBe(429);
	await Promise.all(contexts.map((c) => c.dispose()));
});

test('after sign-in, redirect targets that a browser reads as another host go to the role home', async ({
	playwright,
	baseURL
}) => {
	const variants = [
		'/%5Cevil.example',
		'/%5C%5Cevil.example',
		'/%09/evil.example',
		'/%0A/evil.example',
		'/%0D/evil.example',
		'//evil.example',
		'/%2F/evil.example',
		'https%3A%2F%2Fevil.example',
		'%2F%5Cevil.example',
		'/%5C/evil.example/'
	];
	for (const target of variants) {
		const ctx = await playwright.request.newContext({ baseURL });
		const res = await ctx.post(`/sign-in?redirectTo=${target}`, {
			form: { email: 'planner@kestrelvale.test', password: 'castellan-demo' },
			headers: { origin: baseURL!, accept: 'text/html' },
			maxRedirects: 0
		});
		expect(res.status(), target).toBe(303);
		const location = res.headers()['location'] ?? '';
		expect(location, target).not.toMatch(/evil|\\|[\t\r\n]/);
		expect(new URL(location, baseURL).origin, target).toBe(new URL(baseURL!).origin);
		// The same for a visitor already signed in who opens the sign-in page.
		const again = await ctx.get(`/sign-in?redirectTo=${target}`, { maxRedirects: 0 });
		expect(again.status(), target).toBe(303);
		expect(again.headers()['location'] ?? '', target).not.toMatch(/evil|\\|[\t\r\n]/);
		await ctx.dispose();
	}
	// A same-origin path is still followed.
	const ctx = await playwright.request.newContext({ baseURL });
	const ok = await ctx.post('/sign-in?redirectTo=%2Fbookings', {
		form: { email: 'planner@kestrelvale.test', password: 'castellan-demo' },
		headers: { origin: baseURL!, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(ok.headers()['location']).toBe('/bookings');
	await ctx.dispose();
});

test('a part name with a line break and a formula stays one quoted, defused cell in every export', async ({
	page
}) => {
	await signIn(page, 'admin');
	const name = 'Line one\n=1+1;2\r\n@SUM(A1)';
	const res = await postForm(page, `/dies/${DIE}/edit`, dieForm({ partName: name }));
	expect(res.status(), await res.text().then((t) => t.slice(0, 300))).toBe(303);
	for (const url of ['/dies/export.csv', '/jobs/export.csv']) {
		const csv = await (await page.request.get(url)).text();
		// No physical line may start with a formula trigger (the cell's second and third lines included).
		for (const line of csv.split(/\r\n|\r|\n/)) expect(line, url).not.toMatch(/^[=+@]/);
		expect(csv, url).toContain(`"Line one\n'=1+1;2\r\n'@SUM(A1)"`);
	}
	// Put the hostile name back for anything that runs after.
	await postForm(page, `/dies/${DIE}/edit`, dieForm({ partName: HOSTILE_NAME }));
});

test('the server is still up after all of it', async ({ request }) => {
	const res = await request.get('/sign-in');
	expect(res.status()).toBe(200);
});
