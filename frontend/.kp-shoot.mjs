import { chromium } from 'playwright-core';
const baseUrl = process.env.KINPATH_TEST_URL;
const [width, ...paths] = process.argv.slice(2);
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--headless', '--no-sandbox', '--disable-gpu'] });
const context = await browser.newContext({ viewport: { width: Number(width), height: 1000 } });
const page = await context.newPage();
await page.goto(`${baseUrl}/sign-in`);
await page.getByLabel('E-mail').fill('registrar@halden.example');
await page.getByLabel('Password', { exact: true }).fill('kinpath-demo-2026');
await page.getByRole('button', { name: 'Sign in' }).click();
await page.waitForURL('**/registrar');
for (const p of paths) {
  const [path, name] = p.split('@');
  await page.goto(`${baseUrl}${path}`);
  await page.waitForTimeout(1500);
  await page.screenshot({ path: `/tmp/kp-shots/${name}.png`, fullPage: true });
}
await browser.close();
