// Helpers of the owner-portal specs.
import { expect, type Page } from '@playwright/test';

/**
 * The text a PDF viewer would show. pdfkit (under pdfmake) writes each text run as a hex string
 * inside a TJ array; the statement is not compressed, so no inflating is needed.
 */
export function pdfText(pdf: Buffer): string {
	const raw = pdf.toString('latin1');
	const runs: string[] = [];
	for (const m of raw.matchAll(/\[([^\]]*)\]\s*TJ/g)) {
		for (const h of m[1].matchAll(/<([0-9a-fA-F]*)>/g)) {
			runs.push(Buffer.from(h[1], 'hex').toString('latin1'));
		}
	}
	return runs.join('');
}

/** Creates an API token at /admin/tokens (signed in as admin) and returns its secret. */
export async function createTokenAsAdmin(
	page: Page,
	name: string,
	customer: string | null
): Promise<string> {
	await page.goto('/admin/tokens');
	await page.getByLabel('Name').fill(name);
	await page.getByLabel(/^dies:read/).check();
	await page.getByLabel(/^shots:write/).uncheck();
	if (customer) await page.getByLabel('Bound to customer').selectOption({ label: customer });
	await page.getByRole('button', { name: 'Create token' }).click();
	const token = (await page.getByTestId('new-token').textContent())?.trim() ?? '';
	expect(token).toMatch(/^cst_/);
	return token;
}

/** A small generated JPEG (a gradient, so it looks like a photo to the upload checks). */
export async function makeTestJpeg(seed: number, width = 160, height = 120): Promise<Buffer> {
	const { createJimp } = await import('@jimp/core');
	const jpeg = (await import('@jimp/js-jpeg')).default;
	const Jimp = createJimp({ formats: [jpeg] });
	const data = Buffer.alloc(width * height * 4);
	for (let y = 0; y < height; y++) {
		for (let x = 0; x < width; x++) {
			const i = (y * width + x) * 4;
			data[i] = (x * 255) / width;
			data[i + 1] = (y * 255) / height;
			data[i + 2] = (seed * 47) % 256;
			data[i + 3] = 255;
		}
	}
	return new Jimp({ data, width, height }).getBuffer('image/jpeg', { quality: 85 });
}
