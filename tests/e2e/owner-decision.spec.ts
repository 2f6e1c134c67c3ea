// The owner answers the plant's question in the portal, on a phone, and the toolroom lead sees
// the answer on the die page. Die used: D-0109 (Brookmere's, held in the demo waiting for the
// owner's decision on an overflow, quoted 14 h / 2,400.00).
import { expect, test } from '@playwright/test';
import { signIn } from './support';

test.use({ viewport: { width: 390, height: 844 } });

test('owner answers a held die in the portal; the lead sees "Owner answered" on the die page', async ({
	browser
}) => {
	const owner = await (
		await browser.newContext({ viewport: { width: 390, height: 844 } })
	).newPage();
	await signIn(owner, 'customer');
	const asked = owner.getByTestId('owner-decisions');
	await expect(asked).toContainText('D-0109');
	await expect(asked).toContainText('Quoted repair: 14 h, cost 2,400.00');
	await asked.getByRole('link', { name: 'Answer' }).click();
	await expect(owner).toHaveURL(/\/owner\/dies\/D-0109#decision$/);

	const card = owner.getByTestId('decision-card');
	await expect(card).toContainText('Your decision is asked');
	// Sending without a choice answers nothing.
	await card.getByRole('button', { name: 'Send my answer' }).click();
	await expect(card).toContainText('Choose an answer.');
	await card.getByLabel(/Approve the repair/).check();
	await card.getByLabel(/Your words to the plant/).fill('Yes, add the overflow.');
	await card.getByRole('button', { name: 'Send my answer' }).click();
	await expect(card).toContainText('You answered: Approve the repair');
	await expect(card).toContainText('Yes, add the overflow.');
	await expect(card).toContainText("does not change the die's state by itself");
	await expect(card.getByRole('button', { name: 'Send my answer' })).toHaveCount(0);
	const { scrollWidth, innerWidth } = await owner.evaluate(() => ({
		scrollWidth: document.documentElement.scrollWidth,
		innerWidth: window.innerWidth
	}));
	expect(scrollWidth).toBeLessThanOrEqual(innerWidth);

	const lead = await (await browser.newContext()).newPage();
	await signIn(lead, 'toolroom_lead');
	await lead.goto('/dies/D-0109');
	const seen = lead.getByTestId('decision-card');
	await expect(seen).toContainText('Owner answered: Approve the repair');
	await expect(seen).toContainText('Yes, add the overflow.');
	await expect(lead.getByRole('heading', { name: 'History' }).locator('..')).toContainText(
		'Owner answered: Approve the repair'
	);
});
