import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { baseUrl, expectAccessible, launchBrowser, signIn } from './support/browser';

// The scale as the page showed it before the test, put back afterwards so other files see the demo's.
let original: unknown;
let token: string | null = null;

async function api(path: string, init: RequestInit = {}): Promise<Response> {
  return fetch(`${baseUrl}/api${path}`, {
    ...init,
    headers: {
      'content-type': 'application/json',
      ...(token ? { authorization: `Bearer ${token}` } : {}),
    },
  });
}

describe('grade scale: a new top letter', () => {
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    browser = await launchBrowser();
    const login = await api('/auth/login', {
      method: 'POST',
      body: JSON.stringify({ email: 'registrar@halden.example', password: 'kinpath-demo-2026' }),
    });
    token = ((await login.json()) as { accessToken: string }).accessToken;
    const scale = (await (await api('/grade-scale')).json()) as {
      letters: unknown;
      marks: unknown;
      passingThreshold: string;
    };
    original = {
      letters: scale.letters,
      marks: scale.marks,
      passingThreshold: scale.passingThreshold,
    };
  });
  afterAll(async () => {
    if (original) await api('/grade-scale', { method: 'PUT', body: JSON.stringify(original) });
    await browser?.close();
  });

  it('adds A+ at 4.3 with one "Add a letter" and saves it at the top', async () => {
    page = await (await browser.newContext({ viewport: { width: 1366, height: 900 } })).newPage();
    await signIn(page, 'registrar@halden.example');
    await page.waitForURL('**/registrar');
    await page.goto(`${baseUrl}/registrar/grade-scale`);
    const form = page.getByRole('form', { name: 'Grade scale' });
    await form.waitFor();
    const rows = await form.getByRole('table', { name: 'Letters' }).getByRole('row').count();

    await form.getByRole('button', { name: 'Add a letter' }).click();
    await form.getByLabel(`Letter, row ${rows}`, { exact: true }).fill('A+');
    await form.getByLabel('Grade points of A+').fill('4.3');
    await form.getByRole('button', { name: 'Save grade scale' }).click();
    const dialog = page.getByRole('dialog', { name: 'Save the grade scale?' });
    await dialog.getByRole('button', { name: 'Save and re-derive' }).click();
    await page.getByText(/^Grade scale saved\./).waitFor();

    // The stored scale and the form both list the new letter first.
    const stored = (await (await api('/grade-scale')).json()) as {
      letters: { letter: string; points: number }[];
      maxPoints: number;
    };
    expect(stored.letters[0]).toEqual({ letter: 'A+', points: 4.3 });
    expect(stored.maxPoints).toBe(4.3);
    await expect(form.getByLabel('Letter, row 1', { exact: true }).inputValue()).resolves.toBe(
      'A+',
    );
    await expectAccessible(page);
  });
});
