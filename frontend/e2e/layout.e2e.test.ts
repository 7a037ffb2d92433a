import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { accessibilityProblems, baseUrl, launchBrowser, signIn } from './support/browser';
import { anActiveStudentNumber } from './support/demo';

/** A tablet held upright and an office laptop: no page may scroll sideways at either. */
const WIDTHS = [768, 1366] as const;

interface Visit {
  name: string;
  /** Opens the page and waits until its content is drawn. */
  open: (page: Page) => Promise<void>;
}

const byPath = (path: string, heading: string | RegExp): Visit => ({
  name: path,
  open: async (page) => {
    await page.goto(`${baseUrl}${path}`);
    await page.getByRole('heading', { level: 1, name: heading }).waitFor();
    // Tables and charts come after the heading; a page is done once nothing is loading.
    await page.waitForLoadState('networkidle');
    await page
      .getByRole('progressbar')
      .first()
      .waitFor({ state: 'detached', timeout: 20_000 })
      .catch(() => undefined);
  },
});

const studentPage = (number: string): Visit => ({
  name: 'the student page',
  open: async (page) => {
    await page.goto(`${baseUrl}/advising`);
    await page.getByLabel(/Student number/).fill(number);
    await page.getByRole('button', { name: 'Look up' }).click();
    await page.waitForURL('**/advising/students/**');
    await page.getByRole('table', { name: /^Electives for/ }).waitFor();
    await page.waitForLoadState('networkidle');
  },
});

const student = anActiveStudentNumber();

const ROLES: { email: string; pages: Visit[] }[] = [
  {
    email: 'advisor@halden.example',
    pages: [byPath('/advising', 'Advising'), studentPage(student)],
  },
  {
    email: 'registrar@halden.example',
    pages: [
      byPath('/registrar', 'Registrar'),
      byPath('/registrar/imports', 'Imports'),
      byPath('/registrar/catalogue', /^Catalogue/),
      byPath('/registrar/grade-scale', 'Grade scale'),
      byPath('/registrar/model', 'Model settings'),
      byPath('/registrar/backtests', 'Backtests'),
      byPath('/outlook', 'Demand outlook'),
      byPath('/audit', 'Audit trail'),
      byPath('/advising', 'Advising'),
      studentPage(student),
    ],
  },
  { email: 'head.cmp@halden.example', pages: [byPath('/outlook', 'Demand outlook')] },
  {
    email: 'admin@halden.example',
    pages: [byPath('/admin/users', 'Users'), byPath('/audit', 'Audit trail')],
  },
];

const PUBLIC: Visit[] = [byPath('/sign-in', /Sign in/), byPath('/forgot-password', /password/i)];

/** How far the page scrolls sideways, and the widest element that sticks out. */
async function sidewaysScroll(page: Page) {
  return page.evaluate(() => {
    const root = document.scrollingElement as HTMLElement;
    const width = root.clientWidth;
    let widest = '';
    let widestRight = width;
    for (const element of Array.from(document.body.querySelectorAll<HTMLElement>('*'))) {
      const right = element.getBoundingClientRect().right;
      if (right > widestRight + 0.5) {
        widestRight = right;
        widest = `${element.tagName.toLowerCase()}.${String(element.className).slice(0, 80)}`;
      }
    }
    return { scrollWidth: root.scrollWidth, clientWidth: width, widest };
  });
}

/** Tables cut off by their own box at this width (named by their label). */
async function clippedTables(page: Page) {
  return page.evaluate(() =>
    Array.from(document.querySelectorAll('table'))
      .filter((table) => {
        const box = table.parentElement as HTMLElement;
        return table.getBoundingClientRect().width > box.clientWidth + 1;
      })
      .map((table) => table.getAttribute('aria-label') ?? table.getAttribute('aria-labelledby')),
  );
}

describe('every page fits its window', { timeout: 600_000 }, () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  async function check(page: Page, visits: Visit[], label: string) {
    const problems: string[] = [];
    for (const visit of visits) {
      for (const width of WIDTHS) {
        await page.setViewportSize({ width, height: 900 });
        await visit.open(page);
        const found = await sidewaysScroll(page);
        const titles = await page.evaluate(() => document.head.querySelectorAll('title').length);
        if (titles !== 1) problems.push(`${label} ${visit.name}: ${titles} <title> elements`);
        if (found.scrollWidth > found.clientWidth) {
          problems.push(
            `${label} ${visit.name} at ${width}px: ${found.scrollWidth} > ${found.clientWidth} (${found.widest})`,
          );
        }
        // Every page, at the office width, as axe-core sees it, with no table cut off.
        if (width === 1366) {
          for (const table of await clippedTables(page)) {
            problems.push(`${label} ${visit.name}: table ${table} is cut off at 1366px`);
          }
          for (const problem of await accessibilityProblems(page)) {
            problems.push(`${label} ${visit.name}: ${problem}`);
          }
        }
      }
    }
    expect(problems).toEqual([]);
  }

  it('public pages', async () => {
    const page = await (await browser.newContext()).newPage();
    await check(page, PUBLIC, 'signed out:');
  });

  for (const role of ROLES) {
    it(`${role.email}: ${role.pages.length} pages at ${WIDTHS.join(' and ')} px`, async () => {
      const page = await (await browser.newContext()).newPage();
      await signIn(page, role.email);
      await page.waitForURL((url) => !url.pathname.endsWith('/sign-in'));
      await check(page, role.pages, role.email);
    });
  }
});
