import { readFileSync } from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectAccessible, forbidOtherHosts, launchBrowser, signIn } from './support/browser';

/** The demo head of CMP: the outlook, its backtest and the CSV export, end to end. */
describe('demand outlook of the head of CMP', () => {
  let browser: Browser;
  let page: Page;
  const otherHosts: string[] = [];

  beforeAll(async () => {
    browser = await launchBrowser();
    const context = await browser.newContext({ acceptDownloads: true });
    page = await context.newPage();
    forbidOtherHosts(page, otherHosts);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('shows only CMP electives, with flags in words', async () => {
    await signIn(page, 'head.cmp@halden.example');
    await page.waitForURL('**/outlook');
    await page.getByRole('heading', { level: 1, name: 'Demand outlook' }).waitFor();
    // The first outlook run of a fresh demo may still be under way.
    const table = page.getByRole('table', { name: /electives offered in/ });
    await table.waitFor({ timeout: 120_000 });
    const codes = await table.locator('tbody tr td:first-child').allTextContents();
    expect(codes.length).toBeGreaterThan(0);
    expect(codes.every((c) => c.startsWith('CMP '))).toBe(true);
    const flags = await table.locator('tbody tr td:last-child').allTextContents();
    expect(
      flags.every((f) => ['Over-subscribed', 'At risk', 'No history', 'Balanced'].includes(f)),
    ).toBe(true);
    await expect(
      page
        .getByText(/What drives demand/)
        .first()
        .isVisible(),
    ).resolves.toBe(true);
    await expectAccessible(page);
    expect(otherHosts).toEqual([]);
  }, 180_000);

  it('opens the backtest with the WAPE of each term and per elective', async () => {
    await page.getByRole('tab', { name: 'Backtest' }).click();
    const table = page.getByRole('table', { name: /Backtest of/ });
    await table.waitFor();
    const terms = page.getByRole('table', { name: /WAPE per backtest term/ });
    expect(await terms.locator('tbody tr').count()).toBe(3);
    const codes = await table.locator('tbody tr td:first-child').allTextContents();
    expect(codes.length).toBeGreaterThan(0);
    expect(codes.every((c) => c.startsWith('CMP '))).toBe(true);
    await expectAccessible(page);
  });

  it('exports the outlook as CSV', async () => {
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('button', { name: 'Export CSV' }).click(),
    ]);
    expect(download.suggestedFilename()).toMatch(/^demand-outlook-\d{4}-(WI|SP|SU|FA)-CMP\.csv$/);
    const path = await download.path();
    const lines = readFileSync(path, 'utf8').trim().split(/\r?\n/);
    expect(lines[0]).toBe(
      'term,course_code,title,department,sections,seats,expected,interval_low_80,interval_high_80,utilisation_percent,flag,no_history',
    );
    expect(lines.length).toBeGreaterThan(1);
    for (const line of lines.slice(1)) expect(line.split(',')[3]).toBe('CMP');
  });
});
