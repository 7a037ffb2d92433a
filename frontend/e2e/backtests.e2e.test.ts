import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { baseUrl, expectAccessible, launchBrowser, signIn } from './support/browser';

describe('model settings and backtests in the browser', () => {
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
    page = await context.newPage();
    await signIn(page, 'registrar@halden.example');
    await page.waitForURL('**/registrar');
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('shows the settings in force, each control explained, and the version history', async () => {
    await page.goto(`${baseUrl}/registrar/model`);
    await page.getByRole('heading', { level: 1, name: 'Model settings' }).waitFor();
    const form = page.getByRole('form', { name: 'Model settings' });
    expect(await form.getByLabel('k (kin per course)').inputValue()).toMatch(/^\d+$/);
    await form
      .getByText('Only past students more similar than this count as kin.', { exact: false })
      .waitFor();
    await page.getByRole('table', { name: 'Settings versions' }).waitFor();
    await expectAccessible(page);
  });

  it('runs a two-configuration backtest on the demo data and shows both rows and the chart', async () => {
    await page.goto(`${baseUrl}/registrar/backtests`);
    const form = page.getByRole('form', { name: 'New backtest' });
    await form.waitFor();
    await expectAccessible(page);

    await form.getByRole('button', { name: 'Add a variant' }).click();
    await form.getByLabel('Name, configuration 2').fill('Fewer kin (k 15)');
    await form.getByLabel('k (kin per course), configuration 2').fill('15');
    await form.getByRole('button', { name: 'Run backtest' }).click();

    await page.getByRole('heading', { name: /^Results for \d{4}-(WI|SP|SU|FA)$/ }).waitFor({
      timeout: 180_000,
    });
    const table = page.getByRole('table', { name: 'Backtest results, grade' });
    const current = table.getByRole('row', { name: /Current settings \(version \d+\)/ });
    const variant = table.getByRole('row', { name: /Fewer kin \(k 15\)/ });
    await current.waitFor();
    await variant.waitFor();
    for (const baseline of ['Global mean', 'Course mean', 'Student mean', 'Damped bias']) {
      await table.getByRole('row', { name: new RegExp(baseline) }).waitFor();
    }
    // The best MAE is marked in words, once.
    expect(await table.getByText('lowest MAE').count()).toBe(1);

    const chart = page.getByRole('figure', {
      name: /Grade MAE per configuration \(green\) and baseline \(grey\)/,
    });
    await chart.locator('svg').first().waitFor();
    await chart.getByText('Fewer kin (k 15)').waitFor();
    await chart.getByText('Damped bias (baseline)').waitFor();
    expect(await chart.locator('.MuiBarElement-root').count()).toBe(6);
    // Each configuration shows its margin over the best baseline, with its interval, and how
    // often its likely ranges held the outcome, per confidence level.
    await current.getByRole('cell', { name: /\d\.\d{3} to [+−]?\d\.\d{3}$/ }).waitFor();
    await current.getByRole('cell', { name: /^\d+\.\d %\s*(high|medium|low) / }).waitFor();

    await expectAccessible(page);
  }, 240_000);
});
