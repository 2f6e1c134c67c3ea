import AxeBuilder from '@axe-core/playwright';
import { expect, test } from '@playwright/test';
import { signIn } from './support';

// Dies used here and nowhere else: D-0131 (free-slot finder) and D-0142 (service window). The
// window lies far ahead so it meets nothing the demo plant has booked.

const DAY = 86_400_000;
const dayAhead = (days: number) => new Date(Date.now() + days * DAY).toISOString().slice(0, 10);

test('the press view and the free-slot finder give a fitting slot for a demo order', async ({
	page
}, info) => {
	await signIn(page, 'scheduler');
	await page.goto('/board?by=press&view=timeline');
	await page.getByText('Timeline', { exact: true }).click();
	const timeline = page.getByTestId('board-timeline');
	await expect(
		timeline.locator('[data-testid="board-press-row"][data-press="HC-20"]')
	).toBeVisible();
	await expect(page.getByTestId('board-legend')).toContainText('Blocked');
	await page.screenshot({ path: info.outputPath('press-view.png'), fullPage: true });

	await page.getByRole('link', { name: 'Find a free slot' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Find a free slot' })).toBeVisible();
	await page.getByLabel('Die', { exact: true }).fill('D-0131');
	await page.getByLabel('Good parts').fill('500');
	await page.getByRole('button', { name: 'Find slots' }).click();
	const slots = page.getByTestId('slot');
	await expect(slots.first()).toBeVisible();
	expect(await slots.count()).toBeLessThanOrEqual(3);
	// A fitting slot: the one verdict says fits (or fits with warnings), never blocked.
	await expect(slots.first()).toHaveAttribute('data-verdict', /^(fits|warning)$/);
	const press = await slots.first().getAttribute('data-press');
	await page.screenshot({ path: info.outputPath('free-slots.png'), fullPage: true });

	await slots.first().getByRole('link', { name: 'Book this slot' }).click();
	await expect(page).toHaveURL(/\/bookings\/new\?/);
	await expect(page.getByLabel('Die', { exact: true })).toHaveValue('D-0131');
	await expect(page.getByLabel('Press')).toHaveValue(press!);
});

test('a service window shows on the board, a booking over it is refused with the reason, and it starts a job', async ({
	browser
}, info) => {
	const day = dayAhead(75);
	const lead = await browser.newPage();
	await signIn(lead, 'toolroom_lead');
	await lead.goto('/service-windows');
	await lead.getByLabel('Die', { exact: true }).fill('D-0142');
	await lead.getByLabel('Work').selectOption('stress_relief');
	await lead.getByLabel('Start (plant time)').fill(`${day}T06:00`);
	await lead.getByLabel('End (plant time)').fill(`${day}T14:00`);
	await lead.getByLabel('Note (optional)').fill('E2E stress relief before the long run');
	await lead.getByRole('button', { name: 'Reserve the window' }).click();
	await expect(lead.getByText('Window reserved.')).toBeVisible();
	const item = lead.getByTestId('service-windows').locator('li', { hasText: 'D-0142' });
	await expect(item).toContainText('Reserved');

	const planner = await browser.newPage();
	await signIn(planner, 'scheduler');
	// The board: the window is a bar on D-0142's row, with its text in the popover.
	await planner.setViewportSize({ width: 1280, height: 900 });
	await planner.goto(`/board?from=${day}&days=14`);
	await planner.getByText('Timeline', { exact: true }).click();
	const board = await (await planner.request.get(`/api/v1/board?from=${day}&days=14`)).json();
	const index = board.dies.rows.findIndex((r: string[]) => r[0] === 'D-0142');
	expect(index).toBeGreaterThanOrEqual(0);
	expect(board.windows.rows).toContainEqual(
		expect.arrayContaining([
			index,
			expect.any(Number),
			expect.any(String),
			expect.any(String),
			'stress_relief'
		])
	);
	const timeline = planner.getByTestId('board-timeline');
	await timeline.evaluate((el, i) => (el.scrollTop = i * 40), index);
	const windowBar = timeline.getByRole('button', { name: /^Service window: Stress relief/ });
	await expect(windowBar).toBeVisible();
	await windowBar.focus();
	await expect(planner.getByTestId('board-window-popover').first()).toContainText(
		'No booking may overlap it.'
	);
	await planner.screenshot({ path: info.outputPath('board-window.png'), fullPage: true });

	// A booking over the window is refused with the reason; confirming warnings does not help.
	const refused = await planner.request.post('/api/v1/bookings', {
		data: {
			die: 'D-0142',
			press: 'CC-160',
			startsAt: `${day}T08:00`,
			endsAt: `${day}T20:00`,
			orderRef: 'E2E-WINDOW',
			parts: 500,
			confirm: true
		}
	});
	expect(refused.status()).toBe(422);
	const issues: { field: string; message: string }[] = (await refused.json()).issues;
	const reason = issues.find((i) => i.field === 'service_window');
	expect(reason?.message).toContain('D-0142 is reserved for the toolroom (stress relief)');
	expect(reason?.message).toContain('E2E stress relief before the long run');

	// The toolroom starts it early with one click: the job opens through the toolroom.
	await lead.reload();
	await item.getByRole('button', { name: 'Start now' }).click();
	await expect(lead).toHaveURL(/\/jobs\/TJ-\d+$/);
	await expect(lead.getByText('Service window').first()).toBeVisible();
	await lead.screenshot({ path: info.outputPath('window-job.png'), fullPage: true });
	await lead.close();
	await planner.close();
});

test('on a 390 px phone the press view, the finder and the windows fit, and a bar opens its text on tap', async ({
	browser
}, info) => {
	const context = await browser.newContext({
		viewport: { width: 390, height: 844 },
		hasTouch: true
	});
	const page = await context.newPage();
	await signIn(page, 'scheduler');
	const tooWide: string[] = [];
	for (const url of ['/board?by=press', '/board/slots?die=D-0131&parts=500', '/service-windows']) {
		await page.goto(url);
		if (url.startsWith('/board?')) await expect(page.getByTestId('board-press-list')).toBeVisible();
		const { scrollWidth, innerWidth } = await page.evaluate(() => ({
			scrollWidth: document.documentElement.scrollWidth,
			innerWidth: window.innerWidth
		}));
		if (scrollWidth > innerWidth) tooWide.push(`${url}: ${scrollWidth} px`);
	}
	expect(tooWide).toEqual([]);

	// The timeline on the phone: a tap on a bar shows its full text, a link to the booking in it.
	await page.goto('/board?by=press');
	await page.getByText('Timeline', { exact: true }).click();
	const bar = page.getByTestId('board-timeline').getByTestId('board-run').first();
	await bar.tap();
	await expect(bar).toHaveAttribute('aria-expanded', 'true');
	const popover = page.getByTestId('board-run-popover').first();
	await expect(popover).toBeVisible();
	await expect(popover.getByRole('link', { name: 'Open the booking' })).toBeVisible();
	await page.screenshot({ path: info.outputPath('phone-bar-popover.png') });
	await context.close();
});

test('the press view, the finder and the windows page have no serious accessibility violations', async ({
	page
}) => {
	await signIn(page, 'toolroom_lead');
	for (const path of ['/board?by=press', '/board/slots?die=D-0131&parts=500', '/service-windows']) {
		await page.goto(path);
		if (path.startsWith('/board?'))
			await expect(page.getByTestId('board-press-row').first()).toBeVisible();
		const results = await new AxeBuilder({ page }).analyze();
		const bad = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
		expect(bad.map((v) => `${path}: ${v.id} ${v.help}`)).toEqual([]);
	}
});
