import { createJimp } from '@jimp/core';
import jpeg from '@jimp/js-jpeg';
import { expect, test, type Locator, type Page } from '@playwright/test';
import { ACCOUNTS, DEMO_PASSWORD } from './support';

// The toolmaker's repair flow with the keyboard alone: no clicks, no fill — Tab, Shift+Tab, Enter,
// Space, arrow keys and typing. Every control reached must show where the focus is. Die D-0125 is
// used here and nowhere else.
const DIE = 'D-0125';
const Jimp = createJimp({ formats: [jpeg] });

/** A small generated grey "surface" picture, so the test needs no binary fixture. */
async function surfacePhoto(): Promise<Buffer> {
	const width = 160;
	const height = 120;
	const data = Buffer.alloc(width * height * 4);
	for (let i = 0; i < width * height; i++) {
		const v = 100 + ((i * 7) % 50);
		data.set([v, v, v + 6, 255], i * 4);
	}
	return new Jimp({ data, width, height }).getBuffer('image/jpeg', { quality: 85 });
}

/** Fails unless the focused element draws a visible focus indicator (outline or ring). */
async function expectVisibleFocus(page: Page) {
	const look = await page.evaluate(() => {
		const el = document.activeElement;
		if (!el || el === document.body) return null;
		const cs = getComputedStyle(el);
		return {
			tag: el.tagName.toLowerCase(),
			text: (el.textContent ?? '').trim().slice(0, 40),
			outlineStyle: cs.outlineStyle,
			outlineWidth: parseFloat(cs.outlineWidth),
			boxShadow: cs.boxShadow
		};
	});
	expect(look, 'something has the focus').not.toBeNull();
	const outlined = look!.outlineStyle !== 'none' && look!.outlineWidth > 0;
	const ringed = look!.boxShadow !== 'none';
	expect(outlined || ringed, `focus visible on <${look!.tag}> ${look!.text}`).toBe(true);
}

/** Presses Tab until `target` has the focus (at most `max` presses), checking the focus ring. */
async function tabTo(page: Page, target: Locator, max = 120) {
	await expect(target).toBeVisible();
	for (let i = 0; i < max; i++) {
		await page.keyboard.press('Tab');
		if (await target.evaluate((el) => el === document.activeElement)) {
			await expect(target).toBeFocused();
			await expectVisibleFocus(page);
			return;
		}
	}
	throw new Error(`Tab never reached ${target} in ${max} presses`);
}

test('a toolmaker repairs a die with the keyboard alone', async ({ page }, info) => {
	test.setTimeout(120_000);
	await page.goto('/sign-in');

	// The first Tab lands on the skip link, which shows itself when focused.
	await page.keyboard.press('Tab');
	const skip = page.getByRole('link', { name: 'Skip to content' });
	await expect(skip).toBeFocused();
	await expect(skip).toBeInViewport();
	await expectVisibleFocus(page);

	// Following it skips the header: the next Tab is inside the main content, on the e-mail field.
	await page.keyboard.press('Enter');
	await page.keyboard.press('Tab');
	await expect(page.getByLabel('E-mail')).toBeFocused();
	await expectVisibleFocus(page);

	// Sign in.
	await page.keyboard.type(ACCOUNTS.toolmaker);
	await page.keyboard.press('Tab');
	await expect(page.getByLabel('Password')).toBeFocused();
	await expectVisibleFocus(page);
	await page.keyboard.type(DEMO_PASSWORD);
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(/\/toolroom$/);

	// Find the die through the register's search.
	await tabTo(
		page,
		page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Die register' })
	);
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(/\/dies$/);
	await tabTo(page, page.getByRole('searchbox', { name: 'Search' }));
	await page.keyboard.type(DIE);
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(new RegExp(`q=${DIE}`));
	await tabTo(page, page.getByRole('link', { name: DIE, exact: true }));
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(new RegExp(`/dies/${DIE}$`));

	// The die's toolroom tab, with the safety cautions before the job form.
	await tabTo(
		page,
		page
			.getByRole('navigation', { name: 'Die sections' })
			.getByRole('link', { name: 'Toolroom jobs' })
	);
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(new RegExp(`/dies/${DIE}/jobs$`));
	await expect(page.getByText('Before you start work on the die')).toBeVisible();

	// Kind of job: arrow keys move through the options of a focused select.
	const kind = page.getByLabel('Kind of job');
	await tabTo(page, kind);
	await expect(kind).toHaveValue('repair');
	await page.keyboard.press('ArrowDown');
	await page.keyboard.press('ArrowUp');
	await expect(kind).toHaveValue('repair');
	const half = page.getByLabel('Half', { exact: true });
	await page.keyboard.press('Tab');
	await expect(half).toBeFocused();
	await expectVisibleFocus(page);
	await page.keyboard.press('ArrowDown');
	await expect(half).toHaveValue('cover');
	await tabTo(page, page.getByLabel('Zone (optional)'));
	await page.keyboard.type('cavity 1, boss');
	await tabTo(page, page.getByLabel('What is wrong or what to do'));
	await page.keyboard.type('Keyboard run: soldering on the boss core again, parts sticking.');
	await tabTo(page, page.getByRole('button', { name: 'Open job' }));
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(/\/jobs\/TJ-\d{5}$/);
	await expect(page.getByText('Keyboard run: soldering on the boss core')).toBeVisible();

	// Move the job to in progress.
	const status = page.getByRole('region', { name: 'Status' });
	await tabTo(page, status.getByRole('button', { name: 'Start work' }));
	await page.keyboard.press('Enter');
	await expect(status.getByRole('button', { name: 'Waiting for parts' })).toBeVisible();
	await expect(
		page.getByRole('region', { name: /TJ-\d{5}/ }).getByText('In progress', { exact: true })
	).toBeVisible();

	// A photo: Space on the file field opens the chooser (the test hands it the file).
	await tabTo(page, page.getByLabel('Choose photos'));
	const chooser = page.waitForEvent('filechooser');
	await page.keyboard.press('Space');
	await (
		await chooser
	).setFiles({ name: 'boss-core.jpg', mimeType: 'image/jpeg', buffer: await surfacePhoto() });
	await tabTo(page, page.getByRole('button', { name: 'Upload photos' }));
	await page.keyboard.press('Enter');
	await expect(page.getByText('1 photo added.')).toBeVisible();
	await expect(page.getByRole('heading', { name: 'Photos (1)' })).toBeVisible();

	// Record findings and close it; Space ticks a checkbox.
	await tabTo(page, page.getByLabel('Findings'));
	await page.keyboard.type('Soldering on the boss core, about 4 mm²; no cracks.');
	await page.keyboard.press('Tab');
	await expect(page.getByLabel('Work done')).toBeFocused();
	await page.keyboard.type('Cleaned and polished the core, renewed the release coating.');
	await page.keyboard.press('Tab');
	await expect(page.getByLabel('Hours worked')).toBeFocused();
	await page.keyboard.type('1.75');
	await tabTo(page, page.getByLabel('Billable to the owner'));
	await page.keyboard.press('Space');
	await expect(page.getByLabel('Billable to the owner')).toBeChecked();
	await tabTo(page, page.getByLabel('Summary for the owner'));
	await page.keyboard.type('Core cleaned and polished; die back in service.');
	await tabTo(page, page.getByRole('button', { name: 'Close job as done' }));
	await page.keyboard.press('Enter');
	await expect(page.getByRole('heading', { name: 'Closed' })).toBeVisible();
	await expect(page.getByText('Soldering on the boss core, about 4 mm²; no cracks.')).toBeVisible();
	await expect(page.getByText('1.75 h · Billable')).toBeVisible();
	await page.screenshot({ path: info.outputPath('keyboard-closed.png'), fullPage: true });

	// Back to the die: Shift+Tab walks backwards too.
	await tabTo(page, page.getByRole('link', { name: DIE, exact: true }));
	await page.keyboard.press('Shift+Tab');
	await page.keyboard.press('Tab');
	await expect(page.getByRole('link', { name: DIE, exact: true })).toBeFocused();
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(new RegExp(`/dies/${DIE}$`));
	await expect(
		page.getByRole('region', { name: DIE }).getByText('Ready', { exact: true })
	).toBeVisible();
});
