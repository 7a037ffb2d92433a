import { readFile } from 'node:fs/promises';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectAccessible, launchBrowser, signIn } from './support/browser';
import { runDepartment } from './support/run-code';

const DEPARTMENT = runDepartment('W');
const CATALOGUE_CSV = [
  'course_code,title,department,credits,level,elective,prerequisites,description',
  `${DEPARTMENT} 1101,Harbour Ecology,${DEPARTMENT},3,1000,yes,,`,
  `${DEPARTMENT} 1102,Shoreline Surveying,${DEPARTMENT},3,1000,yes,,`,
].join('\n');

// "Final" holds the grade and "Evaluation" the satisfaction; mapped the wrong way round,
// every row is rejected (5 is above the scale's 4 grade points).
const GRADES_FILE = `grades-${DEPARTMENT}.csv`;
const GRADES_CSV = [
  'student_id,term,course_code,Final,Evaluation',
  `E2E-${DEPARTMENT}-1,2026-SP,${DEPARTMENT} 1101,B+,5`,
  `E2E-${DEPARTMENT}-2,2026-SP,${DEPARTMENT} 1101,A,5`,
  `E2E-${DEPARTMENT}-3,2026-SP,${DEPARTMENT} 1102,A-,5`,
].join('\n');

// Line 3 names a course that is not in the catalogue.
const FIX_FILE = `fix-${DEPARTMENT}.csv`;
const FIX_CSV = [
  'student_id,term,course_code,grade,satisfaction,credits_attempted',
  `E2E-${DEPARTMENT}-4,2026-SP,${DEPARTMENT} 1101,B,4,3`,
  `E2E-${DEPARTMENT}-5,2026-SP,${DEPARTMENT} 9999,C,2,3`,
].join('\n');

describe('correcting an import in the browser', () => {
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    browser = await launchBrowser();
    const context = await browser.newContext({
      acceptDownloads: true,
      viewport: { width: 1366, height: 900 },
    });
    page = await context.newPage();
    await signIn(page, 'registrar@halden.example');
    await page.waitForURL('**/registrar');
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Imports' })
      .click();
    await page.getByRole('heading', { level: 1, name: 'Imports' }).waitFor();
  });
  afterAll(async () => {
    await browser?.close();
  });

  const form = () => page.getByRole('form', { name: 'New import' });

  async function choose(kind: string, name: string, content: string) {
    await form().getByLabel('Kind of file').selectOption(kind);
    await form()
      .getByLabel('Choose a CSV file')
      .setInputFiles({ name, mimeType: 'text/csv', buffer: Buffer.from(content, 'utf8') });
  }

  it('imports the catalogue the term data refers to', async () => {
    await choose('catalogue', `catalogue-${DEPARTMENT}.csv`, CATALOGUE_CSV);
    await form()
      .getByText(/column was found by its name/)
      .waitFor();
    await form().getByLabel('Commit at once when no row is rejected').check();
    await form().getByRole('button', { name: 'Upload and check' }).click();
    await page.getByText('Committed 2 rows.').waitFor({ timeout: 20_000 });
  });

  it('discards a wrongly mapped import, takes the same file again, and checks it again with the right mapping', async () => {
    await choose('records', GRADES_FILE, GRADES_CSV);
    await form().getByLabel('grade (required)').selectOption('Evaluation');
    await form().getByLabel('satisfaction').selectOption('');
    // The unmapped column and the empty optional fields are named before anything is sent.
    await form().getByRole('button', { name: 'Upload and check' }).click();
    const leftOut = form().getByRole('alert').filter({ hasText: 'Not imported' });
    await leftOut.getByText(/column ‘Final’ was mapped to no field/).waitFor();
    await leftOut.getByText(/satisfaction, credits_attempted/).waitFor();
    await form().getByLabel('Import without them').check();
    await form().getByRole('button', { name: 'Upload and check' }).click();

    const detail = page.getByRole('region', { name: `Term data import: ${GRADES_FILE}` });
    await detail
      .getByText('Checked: all 3 rows were rejected; nothing to commit.')
      .waitFor({ timeout: 20_000 });
    await detail.getByRole('button', { name: 'Discard' }).click();
    const dialog = page.getByRole('dialog', { name: 'Discard this import?' });
    await dialog.getByText(/the same file can be uploaded again/).waitFor();
    await dialog.getByRole('button', { name: 'Discard' }).click();
    await detail.getByText(/^Discarded; nothing of this import was written/).waitFor();
    const history = page.getByRole('table', { name: 'Import history' });
    await history
      .getByRole('row')
      .filter({ hasText: GRADES_FILE })
      .getByText('Discarded')
      .waitFor();

    // The same file again, with the same wrong mapping: taken, not refused.
    await choose('records', GRADES_FILE, GRADES_CSV);
    await form().getByLabel('grade (required)').selectOption('Evaluation');
    await form().getByLabel('satisfaction').selectOption('');
    await form().getByLabel('Import without them').check();
    await form().getByRole('button', { name: 'Upload and check' }).click();
    await detail
      .getByText('Checked: all 3 rows were rejected; nothing to commit.')
      .waitFor({ timeout: 20_000 });

    await detail.getByRole('button', { name: 'Check again with another mapping' }).click();
    await detail.getByLabel('grade (required)').selectOption('Final');
    await detail.getByLabel('satisfaction').selectOption('Evaluation');
    await detail.getByRole('button', { name: 'Check again with this mapping' }).click();
    await detail
      .getByText('Checked: all 3 rows accepted. Not committed yet.')
      .waitFor({ timeout: 20_000 });
    await detail.getByRole('button', { name: 'Commit 3 rows' }).click();
    await page
      .getByRole('dialog', { name: 'Commit this import?' })
      .getByRole('button', { name: 'Commit 3 rows' })
      .click();
    await detail.getByText('Committed 3 rows.').waitFor({ timeout: 20_000 });
    const rows = history.getByRole('row').filter({ hasText: GRADES_FILE });
    await expect.poll(() => rows.count()).toBe(3);
    await expect
      .poll(
        async () => (await rows.allTextContents()).filter((t) => t.includes('Discarded')).length,
      )
      .toBe(2);
  });

  it('offers the rejected rows in the file’s own columns with a reason, while the import is open', async () => {
    await choose('records', FIX_FILE, FIX_CSV);
    await form()
      .getByText(/column was found by its name/)
      .waitFor();
    await form().getByRole('button', { name: 'Upload and check' }).click();
    const detail = page.getByRole('region', { name: `Term data import: ${FIX_FILE}` });
    await detail
      .getByText('Checked: 1 row accepted, 1 rejected. Not committed yet.')
      .waitFor({ timeout: 20_000 });
    await detail.getByText(/keeps only until this import is committed or discarded/).waitFor();
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      detail.getByRole('button', { name: 'Download rows to fix (CSV)' }).click(),
    ]);
    expect(download.suggestedFilename()).toBe(`fix-${DEPARTMENT}-rows-to-fix.csv`);
    const lines = (await readFile(await download.path(), 'utf8'))
      .replace(/^\ufeff/, '')
      .trim()
      .split(/\r?\n/);
    expect(lines).toEqual([
      'student_id,term,course_code,grade,satisfaction,credits_attempted,reason',
      `E2E-${DEPARTMENT}-5,2026-SP,${DEPARTMENT} 9999,C,2,3,course_code: course '${DEPARTMENT} 9999' is not in the catalogue`,
    ]);
    await expectAccessible(page);
    await detail.getByRole('button', { name: 'Discard' }).click();
    await page
      .getByRole('dialog', { name: 'Discard this import?' })
      .getByRole('button', { name: 'Discard' })
      .click();
    await detail.getByText(/^Discarded; nothing of this import was written/).waitFor();
    await expect
      .poll(() => detail.getByRole('button', { name: 'Download rows to fix (CSV)' }).count())
      .toBe(0);
  });

  it('fits the import pages: tables and reasons whole at 1366 px, no sideways page scroll down to 768 px', async () => {
    // An import with a long reason, so the report has something wide to show.
    await choose('records', `wide-${DEPARTMENT}.csv`, FIX_CSV.replace('9999', '9998'));
    await form()
      .getByText(/column was found by its name/)
      .waitFor();
    await form().getByRole('button', { name: 'Upload and check' }).click();
    const detail = page.getByRole('region', { name: `Term data import: wide-${DEPARTMENT}.csv` });
    await detail.getByRole('table', { name: 'Validation report' }).waitFor({ timeout: 20_000 });
    for (const width of [1366, 1024, 768]) {
      await page.setViewportSize({ width, height: 900 });
      await page.waitForTimeout(200);
      const layout = await page.evaluate(() => {
        const doc = document.documentElement;
        // A table is clipped when it is wider than the box around it: its last columns
        // would sit behind a scroll bar or be cut off.
        const clipped = [...document.querySelectorAll('table')]
          .filter((table) => {
            const box = table.parentElement as HTMLElement;
            return table.getBoundingClientRect().width > box.clientWidth + 1;
          })
          .map((table) => table.getAttribute('aria-labelledby') ?? 'table')
          .map((id) => document.getElementById(id)?.textContent ?? id);
        // What sticks out past the page's right edge, innermost last, to say what to fix.
        const beyond = [...document.querySelectorAll('body *')]
          .filter((el) => {
            if (el.getBoundingClientRect().right <= doc.clientWidth + 0.5) return false;
            // Inside a box that scrolls (or clips) within the page, it does not widen the page.
            for (let up = el.parentElement; up && up !== document.body; up = up.parentElement) {
              if (
                getComputedStyle(up).overflowX !== 'visible' &&
                up.getBoundingClientRect().right <= doc.clientWidth + 0.5
              ) {
                return false;
              }
            }
            return true;
          })
          .slice(-3)
          .map((el) => `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 80)}`);
        return { sideways: doc.scrollWidth - doc.clientWidth, clipped, beyond };
      });
      // Narrower, a wide table may scroll inside its own focusable box, never the page.
      expect({ width, ...layout }).toEqual({
        width,
        sideways: 0,
        clipped: width >= 1366 ? [] : layout.clipped,
        beyond: [],
      });
    }
    await page.setViewportSize({ width: 1366, height: 900 });
    // Dates read the same everywhere: ISO order.
    const uploaded = await detail
      .getByText(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}$/)
      .first()
      .textContent();
    expect(uploaded).toMatch(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}$/);
  });
});
