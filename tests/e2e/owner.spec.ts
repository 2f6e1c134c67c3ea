// The owner portal end to end. Dies used: D-0101, D-0103, D-0109 (Brookmere Pumps) and D-0112
// (Lumenfold Lighting, only read, as the other owner's die).
import { expect, test, type Browser } from '@playwright/test';
import { ACCOUNTS, signIn, type Account } from './support';
import { createTokenAsAdmin, makeTestJpeg, pdfText } from './owner-support';

const BROOKMERE_DIES = Array.from(
	{ length: 11 },
	(_, i) => `D-${String(101 + i).padStart(4, '0')}`
);

async function pageAs(browser: Browser, who: Account) {
	const context = await browser.newContext();
	const page = await context.newPage();
	await signIn(page, who);
	return page;
}

test('a tooling owner sees exactly its dies and downloads the CSV and the PDF statement', async ({
	page
}) => {
	await signIn(page, 'customer');
	await expect(page).toHaveURL(/\/owner$/);
	await expect(page.getByRole('heading', { name: 'My tooling' })).toBeVisible();
	const rows = page.getByRole('table').getByRole('row');
	await expect(rows).toHaveCount(1 + BROOKMERE_DIES.length);
	for (const n of BROOKMERE_DIES) {
		await expect(page.getByRole('table').getByRole('link', { name: n, exact: true })).toBeVisible();
	}
	await expect(page.locator('body')).not.toContainText('D-0112');
	await expect(page.locator('body')).not.toContainText('Lumenfold');
	await expect(page.getByText('Dies in service')).toBeVisible();

	// Search and sort travel in the URL.
	await page.getByLabel('Search my dies').fill('D-0109');
	await page.getByRole('button', { name: 'Search' }).click();
	await expect(rows).toHaveCount(2);
	await expect(rows.nth(1)).toContainText('D-0109');
	await page.goto('/owner?sort=shots&dir=desc');
	await expect(page.getByRole('columnheader', { name: /Total shots/ })).toHaveAttribute(
		'aria-sort',
		'descending'
	);

	// CSV through the page's own link.
	await page.goto('/owner');
	const [csvDownload] = await Promise.all([
		page.waitForEvent('download'),
		page.getByRole('link', { name: 'Download CSV' }).click()
	]);
	const csvPath = await csvDownload.path();
	const csv = (await import('node:fs')).readFileSync(csvPath!, 'utf8');
	const csvLines = csv.trim().split(/\r\n/);
	expect(csvLines[0]).toContain('die,part,part_number');
	expect(
		csvLines
			.slice(1)
			.map((l) => l.split(',')[0])
			.sort()
	).toEqual(BROOKMERE_DIES);
	expect(csv).not.toMatch(/D-01(1[2-9]|[2-4]\d)|Lumenfold|Tollard|Ashcombe/);

	// The PDF statement (this quarter, the form's default): a real PDF naming every die of the
	// owner and no other.
	await page.getByRole('link', { name: 'Statements (PDF, CSV)' }).click();
	await expect(page.getByRole('heading', { name: 'Statements', exact: true })).toBeVisible();
	const [pdfDownload] = await Promise.all([
		page.waitForEvent('download'),
		page.getByRole('button', { name: 'Download PDF' }).click()
	]);
	expect(pdfDownload.suggestedFilename()).toMatch(/^ST-BRKPUMP-\d{8}-\d{2}\.pdf$/);
	const pdf = (await import('node:fs')).readFileSync((await pdfDownload.path())!);
	expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
	expect(pdf.subarray(-8).toString('latin1')).toContain('%%EOF');
	const text = pdfText(pdf);
	expect(text).toContain('Tooling statement');
	expect(text).toContain('Brookmere Pumps');
	for (const n of BROOKMERE_DIES) expect(text).toContain(n);
	expect(text).not.toMatch(/D-01(1[2-9]|[2-4]\d)|Lumenfold|Tollard|Ashcombe/);
});

test('the die page: chart with a table alternative, halves, history and the monthly ledger', async ({
	page
}) => {
	await signIn(page, 'customer');
	await page.goto('/owner/dies/D-0101');
	await expect(page.getByRole('heading', { name: 'D-0101' })).toBeVisible();
	const chart = page.getByRole('img', { name: /Cumulative shots of die D-0101/ });
	await expect(chart).toBeVisible();
	await page.getByText('Shots by month (table)').click();
	const monthTable = page.getByRole('table', { name: 'Shots of die D-0101 by month' });
	await expect(monthTable).toBeVisible();
	expect(await monthTable.getByRole('row').count()).toBeGreaterThan(6);
	await expect(page.getByRole('heading', { name: 'Die halves' })).toBeVisible();
	await expect(page.getByRole('cell', { name: 'D-0101-C1' })).toBeVisible();
	await expect(page.getByRole('heading', { name: 'Service history' })).toBeVisible();
	await expect(page.getByText('Open press bookings')).toBeVisible();

	const ledger = await page.request.get('/owner/dies/D-0101/ledger.csv');
	expect(ledger.status()).toBe(200);
	expect(ledger.headers()['content-type']).toContain('text/csv');
	const lines = (await ledger.text()).trim().split(/\r\n/);
	expect(lines[0]).toContain('die,month,shots,days_run,total_shots_at_month_end,row');
	expect(lines.length).toBeGreaterThan(6);
	// The balance brought forward first, marked as such and not as a month's shots.
	expect(lines[1]).toMatch(/^D-0101,Opening balance \(before \d{4}-\d{2}\),,,\d+,opening_balance$/);
	for (const line of lines.slice(2)) {
		expect(line).toMatch(/^D-0101,\d{4}-\d{2},-?\d+,\d+,\d+,month$/);
	}
	// No month carries the opening balance: the first month's shots are a month's production.
	const [opening, firstMonth] = [lines[1], lines[2]].map((l) => l.split(','));
	expect(Number(firstMonth[2])).toBeLessThan(Number(opening[4]));
	// The last month ends at the total the page shows.
	const lastTotal = Number(lines.at(-1)!.split(',')[4]);
	const shown = await page.getByText('Total shots').locator('..').locator('dd').textContent();
	expect(Number(shown!.replace(/\D/g, ''))).toBe(lastTotal);
});

test('another owner’s die and its exports answer 404, in pages, downloads and the API', async ({
	page
}) => {
	await signIn(page, 'customer');
	const res = await page.goto('/owner/dies/D-0112');
	expect(res?.status()).toBe(404);
	await expect(page.getByText('This die is not among your tooling.')).toBeVisible();
	await expect(page.locator('body')).not.toContainText('Lumenfold');
	await expect(page.locator('body')).not.toContainText('Spotlight heat sink');
	for (const url of [
		'/owner/dies/D-0112/ledger.csv',
		'/owner/dies/D-9999',
		'/api/v1/dies/D-0112'
	]) {
		const r = await page.request.get(url);
		expect(r.status(), url).toBe(404);
		expect(await r.text(), url).not.toMatch(/Lumenfold|Spotlight heat sink/);
	}
	// The plant's own die page is not the owner's: the role check refuses it.
	expect((await page.request.get('/dies/D-0101')).status()).toBe(403);
});

test('photos and summaries the plant shares reach the owner, and nobody else', async ({
	browser
}) => {
	const lead = await pageAs(browser, 'toolroom_lead');
	await lead.goto('/dies/D-0103/jobs');
	await lead.getByLabel('Zone (optional)').fill('cavity 1');
	await lead.getByLabel('What is wrong or what to do').fill('e2e owner portal — internal note');
	const toToolroom = lead.getByLabel('The die goes to the toolroom while the job is open');
	if ((await toToolroom.count()) > 0) await toToolroom.uncheck();
	await lead.getByRole('button', { name: 'Open job' }).click();
	await expect(lead).toHaveURL(/\/jobs\/TJ-\d+$/);
	const jobNumber = /TJ-\d+/.exec(lead.url())![0];
	for (const [i, caption] of [
		[1, 'e2e shared photo'],
		[2, 'e2e private photo']
	] as const) {
		await lead.getByLabel('Choose photos').setInputFiles({
			name: `owner-${i}.jpg`,
			mimeType: 'image/jpeg',
			buffer: await makeTestJpeg(i)
		});
		// Each chosen photo has its own caption field (captions are per photo).
		await lead.getByLabel(`Caption of owner-${i}.jpg`).fill(caption);
		await lead.getByRole('button', { name: 'Upload photos' }).click();
		await expect(lead.getByRole('heading', { name: `Photos (${i})` })).toBeVisible();
	}

	// Share the summary and one photo from the die's sharing page.
	await lead.goto('/dies/D-0103/sharing');
	const jobItem = lead.getByTestId(`share-job-${jobNumber}`);
	await jobItem.getByLabel('Summary for the owner').fill('Cavity polished; ready for production.');
	await jobItem.getByLabel(/Share this summary/).check();
	await jobItem.getByRole('button', { name: 'Save' }).click();
	await expect(jobItem.getByRole('status')).toContainText('shared with the owner');
	const photoItems = lead.locator('[data-testid^="share-photo-"]');
	const sharedItem = photoItems.filter({ hasText: 'e2e shared photo' });
	const privateItem = photoItems.filter({ hasText: 'e2e private photo' });
	// Sharing asks first and says what the owner will see.
	await sharedItem.getByText('Share with owner…').click();
	await expect(sharedItem).toContainText('will see this photo in full on their owner portal');
	await expect(sharedItem).toContainText('the caption “e2e shared photo”');
	await sharedItem.getByRole('button', { name: 'Yes, share it' }).click();
	await expect(sharedItem).toContainText('Shared with the owner');
	const idOf = async (item: typeof sharedItem) =>
		(await item.getAttribute('data-testid'))!.replace('share-photo-', '');
	const sharedId = await idOf(sharedItem);
	const privateId = await idOf(privateItem);

	const owner = await pageAs(browser, 'customer');
	await owner.goto('/owner/dies/D-0103');
	const history = owner
		.getByRole('list', { name: 'Work in progress' })
		.getByRole('listitem')
		.filter({ hasText: jobNumber });
	await expect(history).toContainText('Cavity polished; ready for production.');
	await expect(history).toContainText('In progress');
	await expect(owner.locator('body')).not.toContainText('internal note');
	await expect(owner.locator(`img[src="/photos/${sharedId}/thumb"]`)).toBeVisible();
	await expect(owner.locator(`img[src*="${privateId}"]`)).toHaveCount(0);
	const full = await owner.request.get(`/photos/${sharedId}/full`);
	expect(full.status()).toBe(200);
	expect(full.headers()['content-type']).toBe('image/jpeg');
	expect((await owner.request.get(`/photos/${privateId}/full`)).status()).toBe(404);

	// Lumenfold's buyer gets nothing of Brookmere's: not the photo, not the die.
	const other = await pageAs(browser, 'otherCustomer');
	for (const url of [
		`/photos/${sharedId}/full`,
		`/photos/${sharedId}/thumb`,
		'/owner/dies/D-0103',
		'/owner/dies/D-0103/ledger.csv'
	]) {
		const r = await other.request.get(url);
		expect(r.status(), url).toBe(404);
		expect(await r.text(), url).not.toMatch(/Brookmere|Cavity polished|Seal carrier/);
	}
	for (const p of [lead, owner, other]) await p.context().close();
});

test('the owner sees which API tokens exist for it, never the secrets', async ({ browser }) => {
	const admin = await pageAs(browser, 'admin');
	const mine = await createTokenAsAdmin(admin, 'e2e Brookmere ERP feed', 'Brookmere Pumps');
	await createTokenAsAdmin(admin, 'e2e Lumenfold-only feed', 'Lumenfold Lighting');
	const owner = await pageAs(browser, 'customer');
	await owner.goto('/owner/access');
	const row = owner.getByRole('row').filter({ hasText: 'e2e Brookmere ERP feed' });
	await expect(row).toContainText(mine.slice(0, 10));
	await expect(row).toContainText('dies:read');
	await expect(row).toContainText('Active');
	const html = await owner.content();
	expect(html).not.toContain(mine);
	expect(html).not.toContain(mine.slice(10));
	expect(html).not.toContain('Lumenfold-only');
	for (const p of [admin, owner]) await p.context().close();
});

test('an invited buyer sets a password once and lands on its tooling', async ({ browser }) => {
	const admin = await pageAs(browser, 'admin');
	await admin.goto('/admin/invites');
	// Bad input is refused with a message and nothing is created.
	await admin.getByRole('button', { name: 'Send invitation' }).click();
	await expect(admin.getByText('Choose the customer.')).toBeVisible();
	await admin.getByLabel('Customer').selectOption({ label: 'Brookmere Pumps' });
	await admin.getByLabel('Name').fill('Ezra Testwood');
	await admin.getByLabel('E-mail').fill(ACCOUNTS.customer);
	await admin.getByRole('button', { name: 'Send invitation' }).click();
	await expect(
		admin.getByText(`There is already an account for ${ACCOUNTS.customer}.`)
	).toBeVisible();

	const email = `e2e.invitee.${Date.now()}@brookmere.test`;
	await admin.getByLabel('E-mail').fill(email);
	await admin.getByRole('button', { name: 'Send invitation' }).click();
	await expect(admin.getByTestId('invite-outcome')).toContainText(email);
	const link = (await admin.getByTestId('invite-link').textContent())!.trim();
	expect(link).toMatch(/\/invite\/[A-Za-z0-9_-]{43}$/);
	await expect(admin.getByRole('row').filter({ hasText: email })).toContainText('Waiting');

	const invitee = await (await browser.newContext()).newPage();
	await invitee.goto(new URL(link).pathname);
	await expect(invitee.getByRole('heading', { name: 'Set your password' })).toBeVisible();
	await expect(invitee.getByText('Brookmere Pumps')).toBeVisible();
	await invitee.getByLabel('Password', { exact: true }).fill('short');
	await invitee.getByLabel('Repeat the password').fill('short');
	await invitee.getByRole('button', { name: 'Create my account' }).click();
	await expect(invitee.getByText('Use at least 10 characters.')).toBeVisible();
	await invitee.getByLabel('Password', { exact: true }).fill('a fine long passphrase');
	await invitee.getByLabel('Repeat the password').fill('a fine long passphrase');
	await invitee.getByRole('button', { name: 'Create my account' }).click();
	await expect(invitee).toHaveURL(/\/owner$/);
	await expect(
		invitee.getByRole('table').getByRole('link', { name: 'D-0101', exact: true })
	).toBeVisible();
	await expect(invitee.locator('body')).not.toContainText('D-0112');

	// The link works once.
	await invitee.goto(new URL(link).pathname);
	await expect(invitee.getByText('This invitation link has already been used.')).toBeVisible();
	await admin.goto('/admin/invites');
	await expect(admin.getByRole('row').filter({ hasText: email })).toContainText('Account created');
	await invitee.goto('/invite/not-a-real-link');
	await expect(invitee.getByText('This invitation link is not valid.')).toBeVisible();
	for (const p of [admin, invitee]) await p.context().close();
});
