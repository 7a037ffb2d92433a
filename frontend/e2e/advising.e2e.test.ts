import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { AxeBuilder } from '@axe-core/playwright';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectAccessible, forbidOtherHosts, launchBrowser, signIn } from './support/browser';
import { anActiveStudentNumber } from './support/demo';

interface CaughtMail {
  to: string[] | string;
  subject: string;
  text: string;
}

async function waitForMail(to: string, timeoutMs = 15_000): Promise<CaughtMail> {
  const dir = process.env.KINPATH_MAIL_DIR;
  if (!dir) throw new Error('KINPATH_MAIL_DIR must name the mail catcher’s folder.');
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (existsSync(dir)) {
      for (const file of readdirSync(dir).filter((f) => f.endsWith('.json'))) {
        const mail = JSON.parse(readFileSync(join(dir, file), 'utf8')) as CaughtMail;
        if ([mail.to].flat().includes(to)) return mail;
      }
    }
    await new Promise((done) => setTimeout(done, 250));
  }
  throw new Error(`No mail to ${to} reached the catcher.`);
}

/**
 * axe-core at WCAG 2.1 AA over one open dialog. A modal hides the rest of the page from assistive
 * technology, and the page itself was checked with the dialog closed.
 */
async function expectDialogAccessible(page: Page): Promise<void> {
  const results = await new AxeBuilder({ page })
    .include('[role="dialog"]')
    .withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'])
    .analyze();
  expect(
    results.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`),
  ).toEqual([]);
}

/** The fit column's numbers as shown, top to bottom. */
async function fitValues(page: Page): Promise<number[]> {
  const table = page.getByRole('table', { name: /^Electives for/ });
  const headers = await table.getByRole('columnheader').allTextContents();
  const fitIndex = headers.findIndex((h) => h.trim() === 'Fit');
  const texts = await table
    .locator('tbody tr')
    .evaluateAll((rows, i) => rows.map((r) => r.children[i]?.textContent ?? ''), fitIndex);
  return texts.map((t) => Number.parseFloat(t)).filter((n) => !Number.isNaN(n));
}

// Generous per-step limits: axe-core over the full student page is the slow part on a busy machine.
describe('the advisor’s workspace', { timeout: 120_000 }, () => {
  let browser: Browser;
  let page: Page;
  const otherHosts: string[] = [];
  const studentNumber = anActiveStudentNumber();
  const recipient = `student+${Date.now()}@halden.example`;

  beforeAll(async () => {
    browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
    page = await context.newPage();
    forbidOtherHosts(page, otherHosts);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('looks a student up by number without putting it in the address', async () => {
    await signIn(page, 'advisor@halden.example');
    await page.waitForURL('**/advising');
    await page.getByRole('heading', { level: 1, name: 'Advising' }).waitFor();
    await expectAccessible(page);

    await page.getByLabel(/Student number/).fill('HR0000000');
    await page.getByRole('button', { name: 'Look up' }).click();
    await page.getByText('No records for this student number.').waitFor();
    expect(page.url()).not.toContain('HR0000000');

    await page.getByLabel(/Student number/).fill(studentNumber);
    await page.getByRole('button', { name: 'Look up' }).click();
    await page.waitForURL('**/advising/students/**');
    expect(page.url()).not.toContain(studentNumber);
    await page.getByRole('table', { name: /^Electives for/ }).waitFor();
    await page.getByRole('table', { name: 'Course history' }).waitFor();
    expect(await page.getByRole('heading', { level: 1 }).count()).toBe(1);
    expect(await page.locator('body').textContent()).not.toContain(studentNumber);
    await expectAccessible(page);
  });

  it('sorts the electives by fit', async () => {
    const table = page.getByRole('table', { name: /^Electives for/ });
    const fit = table.getByRole('columnheader', { name: 'Fit' });
    // Best fit first on arrival; one click turns the order round.
    expect(await fit.getAttribute('aria-sort')).toBe('descending');
    await fit.getByRole('button', { name: 'Fit' }).click();
    expect(await fit.getAttribute('aria-sort')).toBe('ascending');
    const ascending = await fitValues(page);
    expect(ascending.length).toBeGreaterThan(2);
    expect(ascending).toEqual([...ascending].sort((a, b) => a - b));

    await fit.getByRole('button', { name: 'Fit' }).click();
    expect(await fit.getAttribute('aria-sort')).toBe('descending');
    const descending = await fitValues(page);
    expect(descending).toEqual([...descending].sort((a, b) => b - a));
  });

  it('explains one elective in a titled panel', async () => {
    const why = page.getByRole('button', { name: /^Why\?/ }).first();
    const label = (await why.getAttribute('aria-label')) ?? '';
    const courseCode = /^Why\? ([A-Z]+ \d+)/.exec(label)?.[1];
    expect(courseCode).toBeTruthy();
    await why.click();

    const panel = page.getByRole('dialog', { name: `Why these estimates for ${courseCode}?` });
    await panel.waitFor();
    await panel.getByRole('heading', { name: 'What made these students alike (grade)' }).waitFor();
    expect(await panel.textContent()).toMatch(/Kin count\s*\d+/);
    expect(await panel.textContent()).toMatch(/collaborative filtering/i);
    await expectDialogAccessible(page);

    await panel.getByRole('button', { name: 'Close the explanation' }).click();
    await panel.waitFor({ state: 'detached' });
    // The page behind a modal is hidden from assistive technology until the panel has gone.
    await page.getByRole('table', { name: /^Electives for/ }).waitFor();
  });

  it('shortlists two electives and e-mails the summary', async () => {
    // The shortlist is shared between advisors and runs: start from an empty one.
    const shortlistSection = page.getByRole('region', { name: /^Shortlist/ });
    await shortlistSection.waitFor();
    while ((await shortlistSection.getByRole('button', { name: /^Remove / }).count()) > 0) {
      const before = await shortlistSection.getByRole('button', { name: /^Remove / }).count();
      await shortlistSection
        .getByRole('button', { name: /^Remove / })
        .first()
        .click();
      await expect
        .poll(() => shortlistSection.getByRole('button', { name: /^Remove / }).count())
        .toBeLessThan(before);
    }

    const table = page.getByRole('table', { name: /^Electives for/ });
    const boxes = table.getByRole('checkbox', { name: /^Shortlist / });
    const chosen: string[] = [];
    for (const index of [0, 1]) {
      const box = boxes.nth(index);
      const name = (await box.getAttribute('aria-label')) ?? '';
      chosen.push(/^Shortlist ([A-Z]+ \d+)/.exec(name)?.[1] ?? '');
      await box.check();
    }
    expect(chosen.every(Boolean)).toBe(true);

    const shortlist = page.getByRole('table', { name: /^Shortlist for/ });
    await expect.poll(() => shortlist.locator('tbody tr').count()).toBe(2);
    for (const code of chosen) await shortlist.getByText(code, { exact: true }).waitFor();

    await page.getByRole('button', { name: 'Send summary' }).click();
    const dialog = page.getByRole('dialog', { name: 'Send a summary to the student' });
    await dialog.waitFor();
    await dialog.getByLabel(/e-mail address/).fill(recipient);
    await dialog.getByLabel(/Message/).fill('As we discussed this morning.');
    await dialog.getByRole('button', { name: 'Send summary' }).click();
    await dialog.waitFor({ state: 'detached' });
    await page.getByText(`Summary sent to ${recipient}`).waitFor();

    const mail = await waitForMail(recipient);
    for (const code of chosen) expect(mail.text).toContain(code);
    expect(mail.text).toContain('As we discussed this morning.');
    expect(mail.text).toMatch(/based on \d+ similar past students/);
    expect(mail.text).toContain('About these estimates');
    expect(mail.text).not.toContain(studentNumber);
  });

  it('loads nothing from another host', () => {
    expect(otherHosts).toEqual([]);
  });
});
