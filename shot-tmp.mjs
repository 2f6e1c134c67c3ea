import { chromium } from '@playwright/test';
const [,, base, email, ...paths] = process.argv;
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox','--disable-gpu','--disable-background-networking','--disable-component-update','--disable-sync','--no-first-run'] });
const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
const errors = [];
page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
await page.goto(base + '/sign-in');
await page.fill('input[name=email]', email);
await page.fill('input[name=password]', 'castellan-demo');
await page.click('button:has-text("Sign in")');
await page.waitForLoadState('networkidle');
console.log('landed', page.url());
for (const p of paths) {
  await page.goto(base + p);
  await page.waitForLoadState('networkidle');
  const name = '/tmp/shot' + p.replace(/[^a-z0-9]/gi, '_') + '.png';
  await page.screenshot({ path: name, fullPage: true });
  console.log('shot', name);
}
console.log('console errors', errors);
await browser.close();
