import { expect, test } from '@playwright/test';
import { PAGES } from './access-table';
import { concrete, parameters } from './route-params';
import { signIn, type Account } from './support';

// The toolroom works from a phone at the bench: every page a toolmaker or a toolroom lead may
// open must fit the screen without sideways scroll at the two common phone widths.

const VIEWPORTS = [
	{ width: 360, height: 740 },
	{ width: 390, height: 844 }
];
const SKIP = new Set(['/', '/sign-in', '/sign-out', '/invite/[token]']);
// The die page and its tabs are checked on a quiet die and on the busiest one in the demo.
const DIES = ['D-0101', 'D-0138'];

function pagesFor(who: Account): string[] {
	const ids = Object.entries(PAGES)
		.filter(([id, cells]) => cells[who] === 'ok' && !SKIP.has(id))
		.map(([id]) => id);
	const p = parameters();
	return ids.flatMap((id) =>
		id.includes('[number]')
			? DIES.map((die) => concrete(id, p).replace('D-0101', die))
			: [concrete(id, p)]
	);
}

for (const who of ['toolmaker', 'toolroom_lead'] as const) {
	for (const viewport of VIEWPORTS) {
		test(`${who} pages fit ${viewport.width} px without sideways scroll`, async ({ browser }) => {
			test.setTimeout(180_000);
			const context = await browser.newContext({ viewport });
			const page = await context.newPage();
			await signIn(page, who);
			const urls = pagesFor(who);
			expect(urls).toContain('/toolroom');
			expect(urls).toContain('/jobs');
			const tooWide: string[] = [];
			for (const url of urls) {
				const res = await page.goto(url);
				expect(res?.status(), url).toBe(200);
				const { scrollWidth, innerWidth } = await page.evaluate(() => ({
					scrollWidth: document.documentElement.scrollWidth,
					innerWidth: window.innerWidth
				}));
				if (scrollWidth > innerWidth) tooWide.push(`${url}: ${scrollWidth} px`);
			}
			expect(tooWide, `pages wider than ${viewport.width} px`).toEqual([]);
			await context.close();
		});
	}
}
