import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { expect } from 'vitest';
import { pseudonymFor } from '../../src/pseudonym/pseudonym';
import { api, bearer, DEMO_USERS, signIn } from './api';

export const REPO_ROOT = resolve(__dirname, '..', '..', '..');

/** The environment `npm test` gave the shared server (demo folder, pseudonym key). */
function serverEnv(): Record<string, string> {
  const raw = process.env.KINPATH_TEST_SERVER_ENV;
  return raw ? (JSON.parse(raw) as Record<string, string>) : {};
}

export function pseudonymOf(studentId: string): string {
  return pseudonymFor(serverEnv().KINPATH_PSEUDONYM_KEY ?? 'halden-test-pseudonym-key', studentId);
}

/** Raw demo student numbers (as the advisor would type them), with status. */
export function demoStudents(): { studentId: string; program: string; status: string }[] {
  const dir = serverEnv().KINPATH_DEMO_DIR ?? join(REPO_ROOT, '.data', 'test', 'demo');
  const lines = readFileSync(join(dir, 'students.csv'), 'utf8').trim().split(/\r?\n/).slice(1);
  return lines.map((line) => {
    const [studentId, program, , status] = line.split(',');
    return { studentId, program, status };
  });
}

export function activeDemoStudents(count: number): string[] {
  return demoStudents()
    .filter((s) => s.status === 'active')
    .slice(0, count)
    .map((s) => s.studentId);
}

export async function lookUp(token: string, studentId: string): Promise<string> {
  const res = await api()
    .post('/api/students/lookup')
    .set(...bearer(token))
    .send({ studentId });
  expect(res.status, res.text).toBe(200);
  return res.body.ref as string;
}

/** Waits until the model includes every committed or rolled-back import (the history says so). */
export async function waitForModel(timeoutMs = 30_000): Promise<void> {
  const token = await signIn(DEMO_USERS.registrar);
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await api()
      .get('/api/imports')
      .set(...bearer(token));
    expect(res.status).toBe(200);
    const waiting = (res.body as { status: string; modelRefreshedAt: string | null }[]).filter(
      (i) => ['committed', 'rolled_back'].includes(i.status) && !i.modelRefreshedAt,
    );
    if (waiting.length === 0) return;
    if (Date.now() > deadline)
      throw new Error(`${waiting.length} imports are not in the model yet`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

export interface CaughtMail {
  to: string[];
  subject: string;
  text: string;
  html: string;
}

/** The message the catcher kept for this address; waits for it to arrive. */
export async function caughtMailTo(address: string, timeoutMs = 10_000): Promise<CaughtMail> {
  const dir = process.env.KINPATH_MAIL_DIR;
  if (!dir) throw new Error('KINPATH_MAIL_DIR is not set: run the API tests through `npm test`.');
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (existsSync(dir)) {
      for (const file of readdirSync(dir).filter((f) => f.endsWith('.json'))) {
        const mail = JSON.parse(readFileSync(join(dir, file), 'utf8')) as CaughtMail;
        if (mail.to.includes(address)) return mail;
      }
    }
    if (Date.now() > deadline) throw new Error(`no message to ${address} was caught`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
