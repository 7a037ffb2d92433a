import { chromium } from 'playwright-core';
const baseUrl = process.env.KINPATH_TEST_URL;
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--headless', '--no-sandbox', '--disable-gpu'] });
const context = await browser.newContext({ viewport: { width: 1400, height: 1000 }, colorScheme: process.env.SCHEME ?? 'light' });
const page = await context.newPage();
await page.goto(`${baseUrl}/sign-in`);
await page.getByLabel('E-mail').fill('registrar@halden.example');
await page.getByLabel('Password', { exact: true }).fill('kinpath-demo-2026');
await page.getByRole('button', { name: 'Sign in' }).click();
await page.waitForURL('**/registrar');
await page.goto(`${baseUrl}/registrar/imports`);
const form = page.getByRole('form', { name: 'New import' });
await form.getByLabel('Kind of file').selectOption('records');
await form.getByLabel('Choose a CSV file').setInputFiles({ name: 'sis-export.csv', mimeType: 'text/csv', buffer: Buffer.from('Student No;Semester;Course;Result;Eval\nS1;2024-FA;ART 1110;A;4\nS2;2024-FA;ART 1210;B;\n') });
await page.getByRole('region', { name: 'Columns' }).waitFor();
await form.getByRole('button', { name: 'Upload and check' }).click();
await page.waitForTimeout(500);
await page.screenshot({ path: `/tmp/kp-shots/mapping-${process.env.SCHEME ?? 'light'}.png`, fullPage: true });
// Open the first partial/validated import and its commit dialog, if any.
const link = page.getByRole('table', { name: 'Import history' }).getByRole('link').first();
await link.click();
await page.waitForTimeout(1000);
const roll = page.getByRole('button', { name: /^(Commit \d|Roll back this)/ }).first();
if (await roll.count()) { await roll.click(); await page.waitForTimeout(500); }
await page.screenshot({ path: `/tmp/kp-shots/dialog-${process.env.SCHEME ?? 'light'}.png` });
await browser.close();
