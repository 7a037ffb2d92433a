import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  baseUrl,
  expectAccessible,
  forbidOtherHosts,
  launchBrowser,
  signIn,
} from './support/browser';

const LANDINGS = [
  { email: 'advisor@halden.example', path: '/advising', heading: 'Advising' },
  { email: 'registrar@halden.example', path: '/registrar', heading: 'Registrar' },
  { email: 'head.cmp@halden.example', path: '/outlook', heading: 'Demand outlook' },
  { email: 'admin@halden.example', path: '/admin/users', heading: 'Users' },
];

describe('sign-in and each role’s landing page', () => {
  let browser: Browser;
  let page: Page;
  const otherHosts: string[] = [];

  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  async function freshPage(): Promise<Page> {
    const context = await browser.newContext();
    page = await context.newPage();
    forbidOtherHosts(page, otherHosts);
    return page;
  }

  it('shows an accessible sign-in page', async () => {
    await freshPage();
    await page.goto(`${baseUrl}/`);
    await page.waitForURL('**/sign-in');
    await expect(page.title()).resolves.toContain('Kinpath');
    await expectAccessible(page);
  });

  it('announces a wrong password', async () => {
    await freshPage();
    await signIn(page, 'advisor@halden.example', 'not-the-password-at-all');
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.textContent()).toContain('E-mail or password is not correct');
  });

  for (const landing of LANDINGS) {
    it(`signs in ${landing.email} to ${landing.path}`, async () => {
      await freshPage();
      await signIn(page, landing.email);
      await page.waitForURL(`**${landing.path}`);
      await page.getByRole('heading', { level: 1, name: landing.heading }).waitFor();
      await expectAccessible(page);
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL('**/sign-in');
    });
  }

  it('shows the script tokens page and the one-time secret accessibly', async () => {
    await freshPage();
    await signIn(page, 'registrar@halden.example');
    await page.waitForURL('**/registrar');
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Script tokens' })
      .click();
    await page.getByRole('heading', { level: 1, name: 'Script tokens' }).waitFor();
    await expectAccessible(page);
    await page.getByRole('textbox', { name: 'Name' }).fill('Accessibility check');
    await page.getByRole('checkbox', { name: /terms:read/ }).check();
    await page.getByRole('button', { name: 'Create token' }).click();
    const dialog = page.getByRole('dialog', { name: /Copy the secret/ });
    await dialog.waitFor();
    expect(await dialog.getByRole('textbox', { name: 'Secret' }).inputValue()).toMatch(/^kp_/);
    await expectAccessible(page);
  });

  it('tells an advisor that the users page is not for their role', async () => {
    await freshPage();
    await signIn(page, 'advisor@halden.example');
    await page.waitForURL('**/advising');
    expect(await page.getByRole('link', { name: /import/i }).count()).toBe(0);
    await page.goto(`${baseUrl}/admin/users`);
    await page.getByText('Not available for your role').waitFor();
    await expectAccessible(page);
  });

  it('loads nothing from another host', () => {
    expect(otherHosts).toEqual([]);
  });
});
