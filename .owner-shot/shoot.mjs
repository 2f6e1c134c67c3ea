import { chromium } from '@playwright/test';
const b = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox'] });
const base = 'http://127.0.0.1:4393';
async function as(email) {
  const ctx = await b.newContext({ viewport: { width: 1280, height: 900 } });
  const p = await ctx.newPage();
  await p.goto(base + '/sign-in');
  await p.getByLabel('E-mail').fill(email);
  await p.getByLabel('Password').fill('castellan-demo');
  await p.getByRole('button', { name: 'Sign in' }).click();
  await p.waitForURL((u) => !u.pathname.includes('sign-in'));
  return p;
}
const o = await as('buyer@brookmere.test');
await o.goto(base + '/owner'); await o.screenshot({ path: '/tmp/owner-shot/home.png', fullPage: true });
await o.goto(base + '/owner/dies/D-0101'); await o.screenshot({ path: '/tmp/owner-shot/die.png', fullPage: true });
await o.setViewportSize({ width: 390, height: 800 });
await o.goto(base + '/owner/dies/D-0109'); await o.screenshot({ path: '/tmp/owner-shot/die-mobile.png', fullPage: true });
await o.setViewportSize({ width: 1280, height: 900 });
await o.goto(base + '/owner/access'); await o.screenshot({ path: '/tmp/owner-shot/access.png', fullPage: true });
const pdf = await o.request.get(base + '/owner/statement.pdf');
(await import('node:fs')).writeFileSync('/tmp/owner-shot/statement.pdf', await pdf.body());
const a = await as('admin@kestrelvale.test');
await a.goto(base + '/admin/invites'); await a.screenshot({ path: '/tmp/owner-shot/invites.png', fullPage: true });
await a.goto(base + '/dies/D-0101/sharing'); await a.screenshot({ path: '/tmp/owner-shot/sharing.png', fullPage: true });
await b.close();
