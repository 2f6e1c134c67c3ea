import path from 'node:path';
import SQLite from 'better-sqlite3';
import { expect, test } from '@playwright/test';
import { signIn } from './support';

// The toolroom bench on a phone (issue 13): drafts that survive a reload and an ended session,
// a second press of "Open job" that lands on the first job, the die search in the header, and
// the state change that says what it does to the press bookings before the move.
// Dies used only here: D-0130, D-0139, D-0144; D-0136 is only read (search, and the ended-session journey, which saves nothing).

test.use({ viewport: { width: 390, height: 844 } });

function e2eDb() {
	return new SQLite(
		path.resolve(`test-results/e2e-data-${process.env.E2E_PORT ?? 4173}/castellan.db`),
		{ readonly: true }
	);
}

test('typed job text comes back after a reload, and goes once the job is opened', async ({
	page
}) => {
	await signIn(page, 'toolmaker');
	await page.goto('/dies/D-0139/jobs');
	const text = 'Heat checking on the gate side insert, cavity 2; polish and re-inspect';
	// The draft is written 300 ms after typing stops, by script that starts once the page is
	// hydrated: type (again, if the first keystrokes came before the script) until it is there.
	await expect
		.poll(async () => {
			await page.getByLabel('What is wrong or what to do').fill(text);
			await page.getByLabel('Zone (optional)').fill('gate side, cavity 2');
			await page.waitForTimeout(600);
			return page.evaluate(() =>
				Object.values(localStorage).some((v) => v.includes('gate side, cavity 2'))
			);
		})
		.toBe(true);
	await page.reload();
	await expect(page.getByTestId('draft-note')).toContainText('Your draft from');
	await expect(page.getByLabel('What is wrong or what to do')).toHaveValue(text);
	await expect(page.getByLabel('Zone (optional)')).toHaveValue('gate side, cavity 2');

	await page.getByRole('button', { name: 'Open job', exact: true }).click();
	await expect(page).toHaveURL(/\/jobs\/TJ-\d+$/);
	await page.goto('/dies/D-0139/jobs');
	await expect(page.getByTestId('draft-note')).toHaveCount(0);
	await expect(page.getByLabel('What is wrong or what to do')).toHaveValue('');
});

// Browser Back re-renders the form with the new job listed, so the form's own list cannot catch a
// second press; the server also takes the same person's same kind of job on the die within
// 15 minutes as the twin (findRecentTwin). D-0144 is this journey's own die.
test('a second press of Open job lands on the job the first press opened', async ({ page }) => {
	await signIn(page, 'toolmaker');
	const text = 'Heat checking on the gate side insert';
	await page.goto('/dies/D-0144/jobs');
	await page.getByLabel('What is wrong or what to do').fill(text);
	await page.getByRole('button', { name: 'Open job', exact: true }).click();
	await expect(page).toHaveURL(/\/jobs\/TJ-\d+$/);
	const job = page.url().split('/').pop()!;
	// Back to the filled form (as the browser's Back button shows it) and submit again: the
	// server takes us to the job the first press opened instead of opening a twin.
	const db = e2eDb();
	const openOn = () =>
		(
			db
				.prepare(
					"select count(*) as n from toolroom_jobs j join dies d on d.id = j.die_id where d.number = 'D-0144' and j.status in ('open','in_progress','waiting_parts')"
				)
				.get() as { n: number }
		).n;
	expect(openOn()).toBe(1);
	// The form as the browser's Back shows it: the page from before the first press.
	await page.goto('/dies/D-0144/jobs');
	await page.evaluate(() => {
		// What the page showed before the first press: no open job on the die.
		const known = document.querySelector<HTMLInputElement>('input[name="knownOpenJobs"]');
		if (known) known.value = '';
	});
	await page.getByLabel('What is wrong or what to do').fill(text);
	await page.getByRole('button', { name: 'Open job', exact: true }).click();
	await expect(page).toHaveURL(new RegExp(`/jobs/${job}\\?already=1$`));
	await expect(page.getByText('instead of a second job')).toBeVisible();
	expect(openOn()).toBe(1);
	db.close();
});

// The enhanced (JavaScript) inspection form: the action answers an ended session with a redirect
// to sign in; the form follows it and the draft stays on the device until the form is taken.
test('an ended session is said as such and the typed findings survive signing in again', async ({
	page,
	context
}) => {
	await signIn(page, 'toolmaker');
	await page.goto('/dies/D-0136/surface');
	const notes = 'Fine hairlines at the ejector pin bosses, no soldering';
	// A complete form, so the browser's own checks let it go: the session is what stops it.
	await page.getByLabel('Zone', { exact: true }).selectOption('gate side');
	await page.getByText('Local crack network, tight').click();
	await page.getByLabel('Notes (optional)').fill(notes);
	// The draft is written 300 ms after typing stops.
	await expect
		.poll(() =>
			page.evaluate(() => Object.values(localStorage).some((v) => v.includes('ejector pin')))
		)
		.toBe(true);

	// The session ends while the toolmaker writes (expired, or signed out elsewhere).
	const cookies = await context.cookies();
	const session = cookies.find((c) => c.name === 'castellan_session')!;
	await context.addCookies([{ ...session, value: 'ended-session-id-0000000000000000' }]);

	// Sent by the enhanced form (fetch, SvelteKit's action header), not as a plain page POST.
	const sent = page.waitForRequest((r) => r.method() === 'POST' && r.url().includes('?/inspect'));
	await page.getByRole('button', { name: 'Record inspection' }).click();
	expect((await sent).headers()['x-sveltekit-action']).toBe('true');
	await expect(page).toHaveURL(/\/sign-in\?.*ended=1/);
	await expect(page.getByText('Your session has ended')).toBeVisible();
	await expect(page.getByText(/network/i)).toHaveCount(0);

	await page.getByLabel('E-mail').fill('toolmaker@kestrelvale.test');
	await page.getByLabel('Password').fill('castellan-demo');
	await page.getByRole('button', { name: 'Sign in' }).click();
	// Back on the page itself (not the action's address), the draft put back.
	await expect(page).toHaveURL(/\/dies\/D-0136\/surface$/);
	await expect(page.getByTestId('draft-note')).toBeVisible();
	await expect(page.getByLabel('Notes (optional)')).toHaveValue(notes);
	await expect(page.getByLabel('Zone', { exact: true })).toHaveValue('gate side');
});

test('the header search reads die numbers as people type them and opens a single hit', async ({
	page
}) => {
	await signIn(page, 'toolmaker');
	for (const typed of ['d 136', 'D0136', '136', 'D-136']) {
		await page.goto('/jobs');
		await page.getByRole('searchbox', { name: 'Find a die' }).fill(typed);
		await page.getByRole('button', { name: 'Go', exact: true }).click();
		await expect(page, typed).toHaveURL(/\/dies\/D-0136$/);
	}
	// Several hits: the register list, filtered.
	await page.getByRole('searchbox', { name: 'Find a die' }).fill('housing');
	await page.getByRole('button', { name: 'Go', exact: true }).click();
	await expect(page).toHaveURL(/\/dies\?go=1&q=housing/);
});

test('the state change says what it does to the press bookings before the move', async ({
	page
}) => {
	const db = e2eDb();
	const rows = db
		.prepare(
			"select b.starts_at from press_bookings b join dies d on d.id = b.die_id where d.number = 'D-0130' and b.cancelled_at is null and b.ends_at > ? order by b.starts_at"
		)
		.all(new Date().toISOString()) as { starts_at: string }[];
	db.close();
	expect(rows.length).toBeGreaterThan(0);
	// Written out by hand: "<n> press booking(s) from <first start date> will be blocked."
	const expected = `${rows.length} press booking${rows.length === 1 ? '' : 's'} from ${rows[0].starts_at.slice(0, 10)} will be blocked.`;

	await signIn(page, 'toolroom_lead');
	await page.goto('/dies/D-0130');
	await page.getByLabel('Move to').selectOption('held');
	const said = page.getByTestId('state-consequences').locator('li:visible');
	await expect(said).toHaveCount(1);
	await expect(said).toContainText(expected);
	await expect(said).toContainText('The production planners are told by e-mail.');
	await page.getByLabel('Move to').selectOption('running');
	await expect(said).toContainText('No press bookings change.');
});
