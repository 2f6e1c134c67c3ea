import { chromium } from '@playwright/test';
import AxeBuilder from '@axe-core/playwright';
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
async function axe(p, label) {
  const r = await new AxeBuilder({ page: p }).analyze();
  const bad = r.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  console.log(label, bad.map((v) => `${v.id} ${v.nodes[0]?.target}`));
}
const o = await as('buyer@brookmere.test');
await o.goto(base + '/owner/access'); await axe(o, 'access');
await o.goto(base + '/owner/dies/D-0101'); await o.getByText('Shots by month (table)').click(); await axe(o, 'die+table');
await o.setViewportSize({ width: 390, height: 800 });
await o.goto(base + '/owner/dies/D-0109'); await o.waitForTimeout(300); await o.screenshot({ path: '/tmp/owner-shot/die-mobile.png', fullPage: true });
await o.setViewportSize({ width: 1280, height: 900 });
await o.goto(base + '/owner/dies/D-0101'); await o.waitForTimeout(300); await o.screenshot({ path: '/tmp/owner-shot/die.png', fullPage: false });
const a = await as('admin@kestrelvale.test');
await a.goto(base + '/admin/invites'); await axe(a, 'invites');
await a.getByLabel('Customer').selectOption({ label: 'Brookmere Pumps' });
await a.getByLabel('Name').fill('Shot Person'); await a.getByLabel('E-mail').fill(`shot${Date.now()}@brookmere.test`);
await a.getByRole('button', { name: 'Send invitation' }).click();
await a.getByTestId('invite-link').waitFor();
await axe(a, 'invites+outcome');
await a.screenshot({ path: '/tmp/owner-shot/invites.png', fullPage: true });
const link = (await a.getByTestId('invite-link').textContent()).trim();
await a.goto(base + '/dies/D-0101/sharing'); await axe(a, 'sharing');
const anon = await (await b.newContext()).newPage();
await anon.goto(link); await axe(anon, 'invite'); await anon.screenshot({ path: '/tmp/owner-shot/invite.png', fullPage: true });
await anon.goto(base + '/invite/nope'); await axe(anon, 'invite-bad');
await b.close();
