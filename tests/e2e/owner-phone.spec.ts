// The owner portal on a phone (390 × 844): the dies list as cards with shots remaining, and the
// photo viewer with its caption and a way back. Dies used: Brookmere's (read only) and one
// shared job photo of theirs (read only).
import path from 'node:path';
import SQLite from 'better-sqlite3';
import { expect, test } from '@playwright/test';
import { PHOTO_STAGE_LABELS } from '../../src/lib/labels';
import { signIn } from './support';

test.use({ viewport: { width: 390, height: 844 } });

const integer = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });

test("the owner's dies are cards with shots remaining, no sideways scroll", async ({ page }) => {
	await signIn(page, 'customer');
	await expect(page).toHaveURL(/\/owner$/);
	const cards = page.getByTestId('owner-die-cards').locator('li[data-die]');
	const count = await cards.count();
	expect(count).toBeGreaterThan(0);
	// The sideways table is not shown on a phone.
	await expect(page.getByRole('table')).toBeHidden();

	const { scrollWidth, innerWidth } = await page.evaluate(() => ({
		scrollWidth: document.documentElement.scrollWidth,
		innerWidth: window.innerWidth
	}));
	expect(scrollWidth).toBeLessThanOrEqual(innerWidth);

	for (let i = 0; i < count; i++) {
		const card = cards.nth(i);
		const number = await card.getAttribute('data-die');
		const remaining = card.getByTestId('shots-remaining');
		await expect(remaining).toBeVisible();
		// Inside the screen, not in a box scrolled off to the side.
		const box = (await remaining.boundingBox())!;
		expect(box.x + box.width).toBeLessThanOrEqual(390);
		// The same figure as the dies API gives the owner for that die.
		const api = await page.request.get(`/api/v1/dies/${number}`);
		expect(api.status()).toBe(200);
		const die = (await api.json()) as { shotsRemaining: number };
		await expect(remaining).toHaveText(integer.format(die.shotsRemaining));
		// Life used as bar and number, and the next service, on the card too.
		await expect(card.getByRole('meter', { name: 'Life used' })).toBeVisible();
		await expect(card.getByText('Next service')).toBeVisible();
	}
});

test('a shared photo opens in a viewer with its caption and a way back', async ({ page }) => {
	const db = new SQLite(
		path.resolve(`test-results/e2e-data-${process.env.E2E_PORT ?? 4173}/castellan.db`),
		{ readonly: true }
	);
	const photo = db
		.prepare(
			`select photos.public_id as id, photos.caption, photos.stage, dies.number as die
			   from photos join dies on dies.id = photos.die_id
			   join customers on customers.id = dies.customer_id
			  where photos.shared_with_owner = 1 and customers.code = 'BRKPUMP'
			    and photos.caption is not null and photos.stage is not null
			  order by photos.id limit 1`
		)
		.get() as { id: string; caption: string; stage: 'before' | 'after'; die: string };
	db.close();
	expect(photo).toBeTruthy();

	await signIn(page, 'customer');
	await page.goto(`/owner/dies/${photo.die}`);
	await page.locator(`a[href="/photos/${photo.id}"]`).click();
	await expect(page).toHaveURL(new RegExp(`/photos/${photo.id}$`));
	await expect(page.getByTestId('photo-caption')).toHaveText(photo.caption);
	await expect(page.getByTestId('photo-stage')).toContainText(PHOTO_STAGE_LABELS[photo.stage].word);
	await expect(page.getByRole('img', { name: photo.caption })).toBeVisible();
	const { scrollWidth, innerWidth } = await page.evaluate(() => ({
		scrollWidth: document.documentElement.scrollWidth,
		innerWidth: window.innerWidth
	}));
	expect(scrollWidth).toBeLessThanOrEqual(innerWidth);

	// Back by the link…
	await page.getByTestId('photo-back').click();
	await expect(page).toHaveURL(new RegExp(`/owner/dies/${photo.die}#photos$`));
	// …and by Escape on a keyboard.
	await page.goto(`/photos/${photo.id}`);
	await page.keyboard.press('Escape');
	await expect(page).toHaveURL(new RegExp(`/owner/dies/${photo.die}#photos$`));

	// Captions are per photo: no two shared photos of the die show the same words.
	await page.goto(`/owner/dies/${photo.die}`);
	const names = await page
		.locator('#photos img')
		.evaluateAll((imgs) => imgs.map((i) => i.getAttribute('alt')));
	expect(new Set(names).size).toBe(names.length);
});
