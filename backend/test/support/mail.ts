import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

export interface CaughtMail {
  to: string[] | string;
  subject: string;
  text: string;
  html: string;
}

/** The folder where the mail catcher writes each message as JSON. */
export function mailDir(): string {
  const dir = process.env.KINPATH_MAIL_DIR;
  if (!dir) throw new Error('KINPATH_MAIL_DIR is not set: run the API tests through `npm test`.');
  return dir;
}

function caughtFor(address: string): CaughtMail[] {
  let names: string[];
  try {
    names = readdirSync(mailDir()).filter((n) => n.endsWith('.json'));
  } catch {
    return [];
  }
  const found: CaughtMail[] = [];
  for (const name of names.sort()) {
    try {
      const mail = JSON.parse(readFileSync(join(mailDir(), name), 'utf8')) as CaughtMail;
      const to = Array.isArray(mail.to) ? mail.to : [mail.to];
      if (to.some((t) => t.toLowerCase().includes(address.toLowerCase()))) found.push(mail);
    } catch {
      // a message still being written
    }
  }
  return found;
}

/** Waits until `count` messages to `address` were caught; returns them oldest first. */
export async function waitForMail(address: string, count = 1, timeoutMs = 10_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const mails = caughtFor(address);
    if (mails.length >= count) return mails;
    if (Date.now() > deadline) {
      throw new Error(`expected ${count} e-mail(s) to ${address}, caught ${mails.length}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}

export function mailsTo(address: string): CaughtMail[] {
  return caughtFor(address);
}

/** The token at the end of a `/invitation/<token>` or `/reset-password/<token>` link. */
export function linkToken(mail: CaughtMail, path: 'invitation' | 'reset-password'): string {
  const match = new RegExp(`/${path}/([A-Za-z0-9_-]+)`).exec(mail.text);
  if (!match) throw new Error(`no ${path} link in: ${mail.text}`);
  return match[1];
}
