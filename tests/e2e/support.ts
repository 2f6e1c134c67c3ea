import { expect, type Page } from '@playwright/test';

export const DEMO_PASSWORD = 'castellan-demo';

/** Demo accounts by role (see scripts/lib/demo-scenario.ts). */
export const ACCOUNTS = {
	admin: 'admin@kestrelvale.test',
	toolroom_lead: 'lead@kestrelvale.test',
	toolmaker: 'toolmaker@kestrelvale.test',
	scheduler: 'planner@kestrelvale.test',
	customer: 'buyer@brookmere.test',
	otherCustomer: 'buyer@lumenfold.test'
} as const;
export type Account = keyof typeof ACCOUNTS;

export async function signIn(page: Page, who: Account) {
	await page.goto('/sign-in');
	await page.getByLabel('E-mail').fill(ACCOUNTS[who]);
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/sign-in/);
}
