import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  baseUrl,
  expectAccessible,
  forbidOtherHosts,
  launchBrowser,
  signIn,
} from './support/browser';

/** The invitation link e-mailed to `address`, as the mail catcher wrote it down. */
async function invitationLink(address: string): Promise<string> {
  const dir = process.env.KINPATH_MAIL_DIR;
  if (!dir)
    throw new Error('KINPATH_MAIL_DIR is not set: run the browser tests through `npm test`.');
  const deadline = Date.now() + 15_000;
  while (Date.now() < deadline) {
    for (const name of readdirSync(dir).filter((n) => n.endsWith('.json'))) {
      try {
        const mail = JSON.parse(readFileSync(join(dir, name), 'utf8')) as {
          to: string[] | string;
          text: string;
        };
        const to = Array.isArray(mail.to) ? mail.to : [mail.to];
        const match = /https?:\/\/\S+\/invitation\/[A-Za-z0-9_-]+/.exec(mail.text);
        if (to.includes(address) && match) return match[0];
      } catch {
        // still being written
      }
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no invitation reached ${address}`);
}

describe('accounts: invite, accept, sign in; the audit trail', { timeout: 150_000 }, () => {
  let browser: Browser;
  const otherHosts: string[] = [];

  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  async function freshPage(): Promise<Page> {
    const page = await (await browser.newContext()).newPage();
    forbidOtherHosts(page, otherHosts);
    return page;
  }

  it('invites a user who sets a password through the e-mailed link and signs in', async () => {
    const email = `invited.${Date.now().toString(36)}@halden.example`;
    const admin = await freshPage();
    await signIn(admin, 'admin@halden.example');
    await admin.waitForURL('**/admin/users');
    await admin.getByRole('table', { name: 'Accounts' }).waitFor();
    await expectAccessible(admin);

    await admin.getByLabel('Name', { exact: true }).fill('Invited Advisor');
    await admin.getByLabel('E-mail').fill(email);
    await admin.getByRole('button', { name: 'Create account' }).click();
    await admin.getByText(/invitation e-mail is on its way/).waitFor();
    await admin
      .getByRole('button', { name: `Resend invitation to Invited Advisor (${email})` })
      .waitFor();

    const link = await invitationLink(email);
    const visitor = await freshPage();
    // The link names the server the mail was sent from; open it on the one under test.
    await visitor.goto(`${baseUrl}${new URL(link).pathname}`);
    await visitor.getByRole('heading', { level: 1, name: 'Set up your account' }).waitFor();
    await expectAccessible(visitor);
    await visitor.getByLabel('New password').fill('juniper-harbour-signal-8');
    await visitor.getByLabel('Repeat the password').fill('juniper-harbour-signal-8');
    await visitor.getByRole('button', { name: 'Set password' }).click();
    await visitor.getByText('Your password is set').waitFor();
    await visitor.getByRole('link', { name: 'Go to sign-in' }).click();
    await signIn(visitor, email, 'juniper-harbour-signal-8');
    await visitor.waitForURL('**/advising');

    // The admin sees the account active now and can deactivate it.
    await admin.reload();
    await admin.getByRole('button', { name: `Deactivate Invited Advisor (${email})` }).click();
    const confirm = admin.getByRole('dialog', { name: 'Deactivate Invited Advisor?' });
    await expectAccessible(admin);
    await confirm.getByRole('button', { name: 'Deactivate' }).click();
    await admin.getByText('is deactivated and signed out everywhere').waitFor();
  });

  it('shows the audit trail to an admin, filtered, accessibly', async () => {
    const page = await freshPage();
    await signIn(page, 'admin@halden.example');
    await page.waitForURL('**/admin/users');
    await page.getByRole('link', { name: 'Audit trail' }).click();
    await page.getByRole('heading', { level: 1, name: 'Audit trail' }).waitFor();
    await page.getByRole('table', { name: 'Entries' }).getByText('Signed in').first().waitFor();
    await expectAccessible(page);
    await page.getByLabel('Action').selectOption('user.invitation_sent');
    await page.getByRole('button', { name: 'Apply filters' }).click();
    await page.getByText(/\d+ entries match/).waitFor();
    const actions = await page.locator('tbody tr td:nth-child(3)').allTextContents();
    expect(actions.length).toBeGreaterThan(0);
    expect(new Set(actions)).toEqual(new Set(['Invitation sent']));
    const download = page.waitForEvent('download');
    await page.getByRole('button', { name: 'Download CSV' }).click();
    expect((await download).suggestedFilename()).toMatch(/^kinpath-audit-.*\.csv$/);
  });

  it('offers a password reset from the sign-in page', async () => {
    const page = await freshPage();
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.getByRole('heading', { level: 1, name: 'Reset your password' }).waitFor();
    await expectAccessible(page);
    await page.getByLabel('E-mail').fill('nobody.here@halden.example');
    await page.getByRole('button', { name: 'Send reset link' }).click();
    await page.getByText(/a link to choose a new password is on its way/).waitFor();
  });

  it('loads nothing from another host', () => {
    expect(otherHosts).toEqual([]);
  });
});
