import { readFile } from 'node:fs/promises';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { baseUrl, expectAccessible, launchBrowser, signIn } from './support/browser';
import { runDepartment } from './support/run-code';

const DEPARTMENT = runDepartment('Q');
const CATALOGUE_FILE = `catalogue-${DEPARTMENT}.csv`;
const TERM_DATA_FILE = `term-data-${DEPARTMENT}.csv`;

const CATALOGUE_CSV = [
  'course_code,title,department,credits,elective',
  `${DEPARTMENT} 1101,Tidal Studies,${DEPARTMENT},3,yes`,
  `${DEPARTMENT} 1102,Estuary Field Methods,${DEPARTMENT},3,yes`,
  `${DEPARTMENT} 2101,Coastal Records,${DEPARTMENT},4,no`,
].join('\n');

// Line 3 (the header is line 1) carries a grade that is neither on the scale nor a mark.
const TERM_DATA_CSV = [
  'student_id,term,course_code,grade,satisfaction',
  `E2E-${DEPARTMENT}-1,2026-SP,${DEPARTMENT} 1101,B+,4`,
  `E2E-${DEPARTMENT}-2,2026-SP,${DEPARTMENT} 1101,Q,3`,
  `E2E-${DEPARTMENT}-3,2026-SP,${DEPARTMENT} 1102,A-,5`,
].join('\n');

describe('registrar imports in the browser', () => {
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    browser = await launchBrowser();
    const context = await browser.newContext({
      acceptDownloads: true,
      viewport: { width: 1400, height: 1000 },
    });
    page = await context.newPage();
    await signIn(page, 'registrar@halden.example');
    await page.waitForURL('**/registrar');
  });
  afterAll(async () => {
    await browser?.close();
  });

  const form = () => page.getByRole('form', { name: 'New import' });

  async function upload(kind: string, name: string, content: string, commitAtOnce: boolean) {
    await form().getByLabel('Kind of file').selectOption(kind);
    await form()
      .getByLabel('Choose a CSV file')
      .setInputFiles({ name, mimeType: 'text/csv', buffer: Buffer.from(content, 'utf8') });
    // The header was read and every column found by name, so no mapping is needed.
    await form()
      .getByText(/column was found by its name/)
      .waitFor();
    // Optional fields the file does not give are named, and leaving them out is confirmed.
    await form().getByLabel('Import without them').check();
    if (commitAtOnce) await form().getByLabel('Commit at once when no row is rejected').check();
    await form().getByRole('button', { name: 'Upload and check' }).click();
  }

  it('imports and commits a catalogue', async () => {
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Imports' })
      .click();
    await page.getByRole('heading', { level: 1, name: 'Imports' }).waitFor();

    await upload('catalogue', CATALOGUE_FILE, CATALOGUE_CSV, true);
    const detail = page.getByRole('region', { name: `Catalogue import: ${CATALOGUE_FILE}` });
    await detail.getByText('Committed 3 rows.').waitFor({ timeout: 20_000 });
    await detail.getByRole('button', { name: 'Roll back this import' }).waitFor();
  });

  it('reports the bad row of a term data file, downloads it, and commits the rest', async () => {
    await upload('records', TERM_DATA_FILE, TERM_DATA_CSV, false);
    const detail = page.getByRole('region', { name: `Term data import: ${TERM_DATA_FILE}` });
    await detail
      .getByText('Checked: 2 rows accepted, 1 rejected. Not committed yet.')
      .waitFor({ timeout: 20_000 });

    const report = detail.getByRole('table', { name: 'Validation report' });
    const rows = report.getByRole('row');
    await expect.poll(() => rows.count()).toBe(2);
    const cells = await rows.nth(1).getByRole('cell').allTextContents();
    expect(cells.slice(0, 3)).toEqual(['3', 'grade', 'Q']);
    expect(cells[3]).toContain("'Q' is not on the grade scale");

    const [download] = await Promise.all([
      page.waitForEvent('download'),
      detail.getByRole('button', { name: 'Download validation report (CSV)' }).click(),
    ]);
    expect(download.suggestedFilename()).toBe(`term-data-${DEPARTMENT}-validation-report.csv`);
    const content = await readFile(await download.path(), 'utf8');
    const lines = content.trim().split(/\r?\n/);
    expect(lines[0]).toBe('line,column,value,reason');
    expect(lines).toHaveLength(2);
    expect(lines[1]).toMatch(/^3,grade,Q,/);

    await detail.getByRole('button', { name: 'Commit 2 rows' }).click();
    const dialog = page.getByRole('dialog', { name: 'Commit this import?' });
    await dialog
      .getByText('Commit 2 accepted rows of term data; 1 rejected row stays out.', { exact: false })
      .waitFor();
    await dialog.getByRole('button', { name: 'Commit 2 rows' }).click();
    await detail
      .getByText('Committed 2 rows; 1 rejected row stayed out.')
      .waitFor({ timeout: 20_000 });

    const history = page.getByRole('table', { name: 'Import history' });
    const row = history.getByRole('row').filter({ hasText: TERM_DATA_FILE });
    await row.getByText('Committed, partial').waitFor();
    const historyCells = await row.getByRole('cell').allTextContents();
    // Rows, accepted, rejected, in the history's column order.
    expect(historyCells.slice(3, 6)).toEqual(['3', '2', '1']);
    expect(historyCells[1]).toBe('Term data');
  });

  it('passes the accessibility checks on the imports page', async () => {
    await expectAccessible(page);
  });

  it('lists the new courses on the catalogue page', async () => {
    await page.goto(`${baseUrl}/registrar/catalogue`);
    await page.getByLabel('Department').selectOption(DEPARTMENT);
    const table = page.getByRole('table', { name: 'Courses' });
    await table.getByText('Estuary Field Methods').waitFor();
    await expect.poll(() => table.getByRole('row').count()).toBe(4);
  });
});
