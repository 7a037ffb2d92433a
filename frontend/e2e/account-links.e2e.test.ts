import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { baseUrl, expectAccessible, launchBrowser } from './support/browser';

describe('an invitation or reset link that cannot be used', () => {
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    browser = await launchBrowser();
    page = await (await browser.newContext()).newPage();
  });
  afterAll(async () => {
    await browser?.close();
  });

  // A well-formed token no account holds: what a used, replaced or expired link looks like.
  const spent = 'Q'.repeat(43);

  it('says so on arrival, before any password is typed', async () => {
    await page.goto(`${baseUrl}/invitation/${spent}`);
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.textContent()).toMatch(/^This link cannot be used/);
    expect(await page.getByLabel('New password').count()).toBe(0);
    await expectAccessible(page);
  });

  it('says a garbled link is incomplete', async () => {
    await page.goto(`${baseUrl}/invitation/not-a-real-link`);
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.textContent()).toContain('The link is not complete');
    expect(await page.getByLabel('New password').count()).toBe(0);
  });

  it('offers a new reset link for a spent reset link', async () => {
    await page.goto(`${baseUrl}/reset-password/${spent}`);
    await page.getByRole('alert').waitFor();
    await page.getByRole('link', { name: 'Ask for a new link' }).click();
    await page.waitForURL('**/forgot-password');
  });
});
