// An owner downloads a quarter statement on a phone. Reads Brookmere Pumps' dies (D-0101 …
// D-0111) only; writes nothing but the statement record of its own customer.
import fs from 'node:fs';
import { expect, test } from '@playwright/test';
import { parse } from 'csv-parse/sync';
import { extractText, getDocumentProxy } from 'unpdf';
import { signIn } from './support';

test.use({ viewport: { width: 390, height: 844 } });

const noSidewaysScroll = async (page: import('@playwright/test').Page) =>
	expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);

test('an owner downloads a quarter statement on a phone, as PDF and CSV with one reference', async ({
	page
}) => {
	await signIn(page, 'customer');
	await page.getByRole('link', { name: 'Statements (PDF, CSV)' }).click();
	await expect(page.getByRole('heading', { name: 'Statements', exact: true })).toBeVisible();
	await noSidewaysScroll(page);

	// A quarter that is impossible: the field says why, nothing is issued.
	await page.goto('/owner/statements?kind=quarter&year=1999&quarter=2');
	await expect(page.getByText('Pick a year from 2000.')).toBeVisible();
	await noSidewaysScroll(page);

	await page.goto('/owner/statements');
	await page.getByRole('radio', { name: 'Quarter' }).check();
	const year = String(new Date().getUTCFullYear() - 1);
	await page.getByRole('textbox', { name: 'Year' }).fill(year);
	await page.getByRole('combobox', { name: 'Quarter' }).selectOption('4');
	const [pdfDownload] = await Promise.all([
		page.waitForEvent('download'),
		page.getByRole('button', { name: 'Download PDF' }).click()
	]);
	const reference = pdfDownload.suggestedFilename().replace(/\.pdf$/, '');
	expect(reference).toMatch(/^ST-BRKPUMP-\d{8}-\d{2}$/);
	const pdf = fs.readFileSync((await pdfDownload.path())!);
	const doc = await getDocumentProxy(new Uint8Array(pdf));
	const { text } = await extractText(doc, { mergePages: true });
	expect(text).toContain(reference);
	expect(text).toContain(`Q4 ${year} (October–December)`);
	expect(text).toContain(`${year}-10-01 to ${year}-12-31`);
	expect(text).toContain('Brookmere Pumps');
	expect(text).not.toMatch(/Lumenfold|D-0112/);

	// The same period as CSV: the same reference, an opening-balance row per die.
	await page.goto('/owner/statements');
	await expect(page.getByText(reference)).toBeVisible();
	await noSidewaysScroll(page);
	const item = page.getByRole('listitem').filter({ hasText: reference });
	const [csvDownload] = await Promise.all([
		page.waitForEvent('download'),
		item.getByRole('link', { name: 'CSV' }).click()
	]);
	expect(csvDownload.suggestedFilename()).toBe(`${reference}.csv`);
	const csv = fs.readFileSync((await csvDownload.path())!, 'utf8').replace(/^\uFEFF/, '');
	const [header, ...rows] = parse(csv) as string[][];
	expect(header.slice(0, 3)).toEqual(['Reference', 'Period', 'Die']);
	const openings = rows.filter((r) => r.at(-2) === 'opening_balance');
	expect(openings.length).toBeGreaterThanOrEqual(11);
	expect(openings[0][header.indexOf('Row')]).toBe(`Opening balance (before ${year}-10-01)`);
	expect(rows.every((r) => r[0] === reference)).toBe(true);
});
