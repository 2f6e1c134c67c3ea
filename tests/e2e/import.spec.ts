import ExcelJS from 'exceljs';
import { expect, test } from '@playwright/test';
import { signIn } from './support';

// Dies IM-0001 … IM-0020 belong to this file alone.
test('an admin imports 20 dies from the template, maps a column, fixes a row and finds them with opening counts', async ({
	page
}, info) => {
	test.setTimeout(120_000);
	await signIn(page, 'admin');
	await page.goto('/dies');
	await page.getByRole('link', { name: 'Import from a spreadsheet' }).click();
	await expect(page).toHaveURL(/\/dies\/import$/);

	// Fill the downloaded template as a plant would: example rows out, 20 dies in.
	const template = await page.request.get('/dies/import/template.xlsx');
	expect(template.ok()).toBe(true);
	const book = new ExcelJS.Workbook();
	await book.xlsx.load((await template.body()) as unknown as ArrayBuffer);
	expect(book.worksheets.map((w) => w.name)).toEqual([
		'Dies',
		'Halves',
		'Service tasks',
		'Explanation'
	]);
	for (const name of ['Dies', 'Halves', 'Service tasks']) book.getWorksheet(name)!.spliceRows(2, 1);
	const dies = book.getWorksheet('Dies')!;
	const header = dies.getRow(1).values as string[];
	const col = (key: string) => header.indexOf(key);
	// A plant's own name for the count column, to be matched by hand.
	dies.getRow(1).getCell(col('opening_shots')).value = 'Shots on counter';
	for (let i = 1; i <= 20; i++) {
		const row = dies.getRow(i + 1);
		row.getCell(col('number')).value = `IM-${String(i).padStart(4, '0')}`;
		row.getCell(col('part_name')).value = `Imported bracket ${i}`;
		row.getCell(col('owner')).value = 'TOLLARD';
		row.getCell(col('alloy')).value = 'A380';
		row.getCell(col('process')).value = 'cold_chamber';
		row.getCell(col('cavities')).value = i === 7 ? '2,5' : 2;
		row.getCell(col('projected_area_cm2')).value = 120 + i;
		row.getCell(col('opening_shots')).value = 1000 * i;
		row.commit();
	}
	const file = Buffer.from(await book.xlsx.writeBuffer());
	await page.getByLabel('File', { exact: true }).setInputFiles({
		name: 'our-dies.xlsx',
		mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
		buffer: file
	});
	await page.getByRole('button', { name: 'Read the file' }).click();
	await expect(page).toHaveURL(/draft=/);

	// The renamed column is not matched yet: the preview asks for it.
	await expect(page.getByLabel('Opening shot count')).toHaveValue('');
	await page.getByLabel('Opening shot count').selectOption('Shots on counter');
	await page.getByRole('button', { name: 'Save the mapping' }).click();
	// Only the saved mapping reads the counts: 1000·(1+…+20) less die 7's 7 000, whose row waits.
	await expect(page.getByTestId('import-summary')).toContainText('203,000 opening');
	await expect(page.getByTestId('import-summary')).toContainText('19 new');
	await expect(page.getByTestId('import-summary')).toContainText('1 need a fix');

	// Row 8 (die 7) has "2,5" cavities: fix it to 2.
	const bad = page.getByTestId('import-row-dies-8');
	await expect(bad).toContainText('has a comma');
	await bad.getByLabel('Cavities').fill('2');
	await bad.getByRole('button', { name: 'Fix' }).click();
	await expect(page.getByTestId('import-row-dies-8')).toContainText('New');
	await expect(page.getByTestId('import-summary')).toContainText('20 new');
	await expect(page.getByTestId('import-summary')).toContainText('0 need a fix');
	// 1000·(1+…+20) = 210 000 opening shots.
	await expect(page.getByTestId('import-summary')).toContainText('210,000 opening');
	await page.screenshot({ path: info.outputPath('import-preview.png'), fullPage: true });

	await page.getByRole('button', { name: 'Dry run' }).click();
	await expect(page.getByTestId('dry-run')).toContainText('20 dies would be created');
	await page.getByRole('button', { name: 'Commit the import' }).click();
	await expect(page.getByTestId('import-done')).toContainText('20 dies created', {
		timeout: 30_000
	});

	await page.getByRole('link', { name: 'Open the die register' }).click();
	await page.getByLabel('Search').fill('IM-00');
	await page.keyboard.press('Enter');
	await expect(page.getByRole('link', { name: 'IM-0020' })).toBeVisible();
	await page.goto('/dies/IM-0020/shots');
	await expect(page.getByText('Opening balance').first()).toBeVisible();
	await expect(page.getByText('20,000').first()).toBeVisible();
	await page.setViewportSize({ width: 390, height: 800 });
	await page.goto('/dies/import');
	const width = await page.evaluate(() => document.documentElement.scrollWidth);
	expect(width).toBeLessThanOrEqual(390);
	await page.screenshot({ path: info.outputPath('import-phone.png'), fullPage: true });
});
