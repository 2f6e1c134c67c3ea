import { createJimp } from '@jimp/core';
import jpeg from '@jimp/js-jpeg';
import { expect, test, type Browser } from '@playwright/test';
import { signIn, type Account } from './support';

// The toolroom journey on D-0102 (ready, A380, no demo toolroom data). D-0104 and D-0106 are
// also reserved for this file; no other spec uses them.
const DIE = 'D-0102';
const Jimp = createJimp({ formats: [jpeg] });

/** A small generated "surface" photo, so the test needs no binary fixture. */
async function surfacePhoto(seed: number): Promise<Buffer> {
	const width = 320;
	const height = 240;
	const data = Buffer.alloc(width * height * 4);
	for (let y = 0; y < height; y++) {
		for (let x = 0; x < width; x++) {
			const i = (y * width + x) * 4;
			const v = 110 + ((x * 7 + y * 13 + seed * 31) % 40);
			data[i] = v;
			data[i + 1] = v;
			data[i + 2] = v + 8;
			data[i + 3] = 255;
		}
	}
	return new Jimp({ data, width, height }).getBuffer('image/jpeg', { quality: 85 });
}

async function pageAs(browser: Browser, who: Account) {
	const context = await browser.newContext();
	const page = await context.newPage();
	await signIn(page, who);
	return page;
}

test('a toolmaker opens a job, adds photos, inspects, checks cooling and closes the job', async ({
	browser
}, info) => {
	test.setTimeout(120_000);

	// The lead defines the cooling circuit the toolmaker will check.
	const lead = await pageAs(browser, 'toolroom_lead');
	await lead.goto(`/dies/${DIE}/cooling`);
	await lead.getByLabel('Label on the die').fill('C1 e2e');
	await lead.getByLabel('Coolant').selectOption('water');
	await lead.getByLabel('Channel diameter, mm').fill('10');
	await lead.getByLabel('Nominal flow, L/min').fill('20');
	await lead.getByRole('button', { name: 'Add circuit' }).click();
	await expect(lead.getByText('Circuit C1 e2e added.')).toBeVisible();
	await lead.context().close();

	const page = await pageAs(browser, 'toolmaker');

	// Open a job from the die's surface-inspection service task.
	await page.goto(`/dies/${DIE}/jobs`);
	await expect(page.getByText('Before you start work on the die')).toBeVisible();
	const taskRow = page.getByRole('listitem').filter({ hasText: 'Surface inspection' });
	await taskRow.getByRole('link', { name: 'Open a job for this task' }).click();
	await expect(page.getByLabel('Kind of job')).toHaveValue('surface_inspection');
	await expect(page.getByRole('checkbox', { name: /Surface inspection/ })).toBeChecked();
	await page.getByLabel('Zone (optional)').fill('gate side');
	await page
		.getByLabel('What is wrong or what to do')
		.fill('Scheduled surface inspection, e2e run');
	await page.getByRole('button', { name: 'Open job' }).click();
	await expect(page).toHaveURL(/\/jobs\/TJ-\d{5}$/);
	const jobUrl = page.url();
	await expect(page.getByText('In toolroom')).toBeVisible();

	// Two photos at once, each sent on its own.
	await page.getByLabel('Choose photos').setInputFiles([
		{ name: 'gate-1.jpg', mimeType: 'image/jpeg', buffer: await surfacePhoto(1) },
		{ name: 'gate-2.jpg', mimeType: 'image/jpeg', buffer: await surfacePhoto(2) }
	]);
	await page.getByRole('button', { name: 'Upload photos' }).click();
	await expect(page.getByText('2 photos added.')).toBeVisible();
	await expect(page.locator('[data-photo-item]').getByText('✓ Added')).toHaveCount(2);
	await expect(page.getByRole('heading', { name: 'Photos (2)' })).toBeVisible();
	await expect(page.locator('img[src^="/photos/"][src$="/thumb"]')).toHaveCount(2);
	const thumb = await page.locator('img[src$="/thumb"]').first().getAttribute('src');
	const served = await page.request.get(thumb!);
	expect(served.status()).toBe(200);
	expect(served.headers()['content-type']).toBe('image/jpeg');
	expect(served.headers()['cache-control']).toContain('private');
	await page.screenshot({ path: info.outputPath('job-photos.png'), fullPage: true });

	// A surface inspection at grade 2.
	await page.goto(`/dies/${DIE}/surface`);
	// The zone comes from the die's list (the demo gives every die a starting list).
	await page.getByLabel('Zone', { exact: true }).selectOption('gate side');
	await page.getByText('Local crack network, tight').click();
	await page.getByRole('button', { name: 'Record inspection' }).click();
	await expect(page.getByText(/Inspection recorded: grade 2/)).toBeVisible();
	await expect(
		page.getByRole('row').filter({ hasText: 'gate side' }).getByText('Grade 2')
	).toBeVisible();

	// A cooling check at 70 % of nominal flow is flagged.
	await page.goto(`/dies/${DIE}/cooling`);
	// The die has the plant's standard circuits too: check the one the lead just added.
	const circuit = page.getByLabel('Circuit', { exact: true });
	const e2eValue = await circuit.locator('option', { hasText: 'C1 e2e' }).getAttribute('value');
	await circuit.selectOption(e2eValue!);
	await page.getByLabel('Measured flow, L/min').fill('14');
	await page.getByLabel('Inlet, °C').fill('30');
	await page.getByLabel('Outlet, °C').fill('36');
	await page.getByLabel('Leak test').selectOption('pass');
	await page.getByRole('button', { name: 'Record check' }).click();
	await expect(page.getByText(/70 % of nominal — below 80 %, flagged as weak/)).toBeVisible();
	await expect(
		page.getByRole('row').filter({ hasText: 'C1 e2e' }).first().getByText('70 % — weak flow')
	).toBeVisible();
	await page.screenshot({ path: info.outputPath('cooling-check.png'), fullPage: true });

	// Hours and a part recorded at the bench while the job is open.
	await page.goto(jobUrl);
	const hoursForm = page.getByRole('form', { name: 'Record hours' });
	await hoursForm.getByLabel('Hours', { exact: true }).fill('1,5');
	await hoursForm.getByLabel('What was done (optional)').fill('Cleaned and inspected the gate');
	await hoursForm.getByRole('button', { name: 'Add hours' }).click();
	await expect(page.getByText('1.5 hours recorded; the job has 1.5 h in all.')).toBeVisible();
	const partForm = page.getByRole('form', { name: 'Record a part' });
	await partForm.getByLabel('Part').fill('Polishing stone 320 grit');
	await partForm.getByLabel('Quantity').fill('2');
	await partForm.getByRole('button', { name: 'Add part' }).click();
	await expect(page.getByTestId('job-parts')).toContainText('Polishing stone 320 grit');
	await expect(page.getByTestId('job-hours')).toContainText('1.5 h');

	// Close the job: the die is ready again and its service task done.
	await page
		.getByLabel('Findings')
		.fill('Tight local network at the gate, longest crack about 3 mm');
	await page.getByLabel('Work done').fill('Inspected, photographed, light polish');
	// 1.5 h recorded above, 0.5 h more at close: 2 h in all.
	await page.getByLabel('Further hours (not yet recorded)').fill('0.5');
	await page.getByLabel('Summary for the owner').fill('Surface inspected; die back in service.');
	await page.getByRole('button', { name: 'Close job as done' }).click();
	await expect(page.getByRole('heading', { name: 'Closed' })).toBeVisible();
	await expect(page.getByTestId('job-hours')).toContainText('2 h');
	await expect(page.getByText('Ready', { exact: true })).toBeVisible();
	const taskLine = page.getByRole('row').filter({ hasText: 'Surface inspection' });
	await expect(taskLine.getByText(/Done by this job at [\d,]+ shots/)).toBeVisible();
	await expect(taskLine.getByText('On track')).toBeVisible();

	await page.goto(`/dies/${DIE}/jobs`);
	await expect(
		page.getByRole('region', { name: DIE }).getByText('Ready', { exact: true })
	).toBeVisible();
	await expect(
		page.getByRole('listitem').filter({ hasText: 'Surface inspection' }).getByText('On track')
	).toBeVisible();
	await page.screenshot({ path: info.outputPath('die-jobs-after.png'), fullPage: true });
});

test('photos on a phone: three chosen, one removed, one bad; the two good ones land, portrait shown whole', async ({
	browser
}, info) => {
	test.setTimeout(120_000);
	const context = await browser.newContext({ viewport: { width: 390, height: 844 } });
	const page = await context.newPage();
	await signIn(page, 'toolmaker');
	await page.goto('/dies/D-0104/jobs');
	await page.getByLabel('What is wrong or what to do').fill('Photo journey on a phone, e2e run');
	await page.getByRole('button', { name: 'Open job' }).click();
	await expect(page).toHaveURL(/\/jobs\/TJ-\d{5}$/);

	const portrait = await new Jimp({ width: 240, height: 320, color: 0x8899aaff }).getBuffer(
		'image/jpeg',
		{ quality: 85 }
	);
	const choose = page.getByLabel('Choose photos');
	await choose.setInputFiles([
		{ name: 'gate-before.jpg', mimeType: 'image/jpeg', buffer: await surfacePhoto(3) },
		{ name: 'notes.jpg', mimeType: 'image/jpeg', buffer: Buffer.from('not a photo at all') },
		{ name: 'core-portrait.jpg', mimeType: 'image/jpeg', buffer: portrait }
	]);
	await choose.setInputFiles([
		{ name: 'wrong-one.jpg', mimeType: 'image/jpeg', buffer: await surfacePhoto(4) }
	]);
	const items = page.locator('[data-photo-item]');
	await expect(items).toHaveCount(4);
	await page.getByRole('button', { name: 'Remove wrong-one.jpg' }).click();
	await expect(items).toHaveCount(3);
	await page.getByLabel('The photos show the die').selectOption('before');
	await page.getByRole('button', { name: 'Upload photos' }).click();

	await expect(page.getByTestId('upload-summary')).toHaveText(
		'2 of 3 photos added; 1 not: notes.jpg.'
	);
	const bad = items.filter({ hasText: 'notes.jpg' });
	await expect(bad).toContainText('Only JPEG and PNG photos are accepted');
	await expect(bad.getByRole('button', { name: 'Remove notes.jpg' })).toBeVisible();
	await expect(page.getByRole('heading', { name: 'Photos (2)' })).toBeVisible();
	const thumbs = page.locator('img[src^="/photos/"][src$="/thumb"]');
	await expect(thumbs).toHaveCount(2);
	await expect(page.getByTestId('photo-stage').filter({ hasText: 'Before the work' })).toHaveCount(
		2
	);
	// Portraits are shown whole: the thumbnail is fitted into its box, not cropped.
	for (const fit of await thumbs.evaluateAll((imgs) =>
		imgs.map((i) => getComputedStyle(i).objectFit)
	)) {
		expect(fit).toBe('contain');
	}
	const sizes = await page.getByText(/\d+ × \d+ px/).allTextContents();
	expect(sizes.some((s) => s.includes('240 × 320 px'))).toBe(true);
	const scroll = await page.evaluate(() => ({
		width: document.documentElement.scrollWidth,
		inner: window.innerWidth
	}));
	expect(scroll.width).toBeLessThanOrEqual(scroll.inner);
	await page.screenshot({ path: info.outputPath('phone-photos.png'), fullPage: true });
	await context.close();
});

test('a planner reads jobs but has no toolroom forms; a customer cannot fetch an unshared photo', async ({
	browser
}) => {
	const planner = await pageAs(browser, 'scheduler');
	await planner.goto('/jobs');
	await expect(planner.getByRole('heading', { level: 1, name: 'Toolroom jobs' })).toBeVisible();
	await planner.goto('/dies/D-0104/jobs');
	await expect(planner.getByRole('heading', { name: 'Job history' })).toBeVisible();
	await expect(planner.getByRole('button', { name: 'Open job' })).toHaveCount(0);
	await planner.goto('/dies/D-0104/cooling');
	await expect(planner.getByRole('button', { name: 'Record check' })).toHaveCount(0);
	await planner.context().close();

	const customer = await pageAs(browser, 'customer');
	const res = await customer.request.get('/photos/AAAAAAAAAAAAAAAAAAAAAA/full');
	expect(res.status()).toBe(404);
	const toolroom = await customer.goto('/jobs');
	expect(toolroom?.status()).toBe(403);
});

test('without JavaScript the job forms and the photo upload still work', async ({ browser }) => {
	const context = await browser.newContext({ javaScriptEnabled: false });
	const page = await context.newPage();
	await signIn(page, 'toolmaker');
	await page.goto('/dies/D-0104/jobs');
	await page
		.getByLabel('What is wrong or what to do')
		.fill('Ejector plate sticks, check guide bushes');
	await page.getByRole('checkbox', { name: /Stress relief/ }).check();
	await page.getByRole('button', { name: 'Open job' }).click();
	await expect(page).toHaveURL(/\/jobs\/TJ-\d{5}$/);
	await expect(page.getByRole('row').filter({ hasText: 'Stress relief' })).toBeVisible();

	// A text file renamed to .jpg is refused by content, with its name and the reason.
	await page
		.getByLabel('Choose photos')
		.setInputFiles([
			{ name: 'notes.jpg', mimeType: 'image/jpeg', buffer: Buffer.from('no cracks') }
		]);
	await page.getByRole('button', { name: 'Upload photos' }).click();
	await expect(page.getByText(/notes\.jpg: Only JPEG and PNG photos are accepted/)).toBeVisible();
	await expect(page.getByRole('heading', { name: 'Photos (0)' })).toBeVisible();

	await page.getByRole('button', { name: 'Start work' }).click();
	await expect(page.getByText('In progress').first()).toBeVisible();
	await page.getByLabel('Findings').fill('x');
	await page.getByRole('button', { name: 'Close job as done' }).click();
	await expect(page.getByText('Record what you found.')).toBeVisible();
	await context.close();
});
