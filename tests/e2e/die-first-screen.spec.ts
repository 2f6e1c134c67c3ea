import { expect, test } from '@playwright/test';
import { signIn } from './support';

// The die page on a phone (issue 13): the die's state — its word and shape — and the "Move to …"
// choice are within the first screen for the toolroom, not below the die's register data.
// D-0136 is only read here (the bench journeys read it too, and nothing moves it).

const SCREEN = { width: 390, height: 844 };
test.use({ viewport: SCREEN });

for (const who of ['toolmaker', 'toolroom_lead'] as const) {
	test(`a ${who.replace('_', ' ')} sees the die's state and "Move to" in the first screen`, async ({
		page
	}) => {
		await signIn(page, who);
		await page.goto('/dies/D-0136');
		const state = page.getByTestId('die-state');
		// The state in words (with its shape beside it), and the move.
		await expect(state.getByTestId('die-state-word')).toBeVisible();
		await expect(state.getByTestId('die-state-word').locator('svg')).toHaveCount(1);
		const move = state.getByLabel('Move to');
		await expect(move).toBeVisible();
		// Nothing scrolled: the page as it opens.
		expect(await page.evaluate(() => window.scrollY)).toBe(0);
		const word = (await state.getByTestId('die-state-word').boundingBox())!;
		const control = (await move.boundingBox())!;
		expect(word.y).toBeLessThan(SCREEN.height);
		expect(control.y).toBeLessThan(SCREEN.height);
		// The whole control, not only its top edge, can be tapped without scrolling.
		expect(control.y + control.height).toBeLessThanOrEqual(SCREEN.height);
		// The page itself never scrolls sideways (the tab row scrolls within itself).
		expect(
			await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)
		).toBe(true);
		await page.screenshot({ path: test.info().outputPath(`die-first-screen-${who}.png`) });
	});
}
