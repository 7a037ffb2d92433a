import { AxeBuilder } from '@axe-core/playwright';
import { chromium, type Browser, type Page } from 'playwright-core';
import { expect } from 'vitest';

export const baseUrl = process.env.KINPATH_TEST_URL ?? 'http://127.0.0.1:3199';
export const DEMO_PASSWORD = 'kinpath-demo-2026';

/** Debian's Chromium, headless, with nothing reaching for the network. */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
    ],
  });
}

/** Fails the page on any request to a host other than the app's own. */
export function forbidOtherHosts(page: Page, seen: string[]): void {
  const own = new URL(baseUrl).host;
  page.on('request', (request) => {
    const url = new URL(request.url());
    if (url.protocol.startsWith('http') && url.host !== own) seen.push(request.url());
  });
}

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** axe-core's violations at WCAG 2.1 A and AA, one line each. */
export async function accessibilityProblems(page: Page): Promise<string[]> {
  const results = await new AxeBuilder({ page })
    .withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'])
    .analyze();
  return results.violations.map(
    (v) =>
      `${v.id} (${v.impact}): ${v.help} — ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`,
  );
}

/** Runs axe-core at WCAG 2.1 A and AA and expects no violations. */
export async function expectAccessible(page: Page): Promise<void> {
  expect(await accessibilityProblems(page)).toEqual([]);
}
