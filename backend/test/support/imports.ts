import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { expect } from 'vitest';
import { bearer, DEMO_USERS, signIn } from './api';

/** An empty demo folder: the demo accounts are created, no term data is loaded. */
export function emptyDemoDir(): string {
  return mkdtempSync(join(tmpdir(), 'kinpath-no-demo-'));
}

export const registrarToken = (url: string) => signIn(DEMO_USERS.registrar, undefined, url);

export async function upload(
  url: string,
  token: string,
  kind: string,
  csv: string | Buffer,
  fields: Record<string, string> = {},
  fileName = `${kind}.csv`,
) {
  let req = request(url)
    .post('/api/imports')
    .set(...bearer(token))
    .field('kind', kind);
  for (const [name, value] of Object.entries(fields)) req = req.field(name, value);
  return req.attach('file', Buffer.isBuffer(csv) ? csv : Buffer.from(csv), fileName);
}

const SETTLED = new Set(['validated', 'committed', 'failed', 'rolled_back']);

/** Polls the import until no job is working on it. */
export async function settle(url: string, token: string, id: string, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await request(url)
      .get(`/api/imports/${id}`)
      .set(...bearer(token));
    expect(res.status).toBe(200);
    if (SETTLED.has(res.body.status)) return res.body;
    if (Date.now() > deadline) throw new Error(`import ${id} still ${res.body.status}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** Uploads with commit=true and waits; the import must end committed. */
export async function importCommitted(url: string, token: string, kind: string, csv: string) {
  const res = await upload(url, token, kind, csv, { commit: 'true' });
  expect(res.status, res.text).toBe(202);
  const done = await settle(url, token, res.body.id);
  expect(done.status, JSON.stringify(done)).toBe('committed');
  return done;
}

export const CATALOGUE =
  'course_code,title,department,credits,level,elective,prerequisites,description\n' +
  'CMP 1100,Programming Foundations,CMP,3,1000,no,,\n' +
  'CMP 2310,Data Structures,CMP,3,2000,yes,CMP 1100,\n' +
  'MTH 1200,Calculus One,MTH,4,1000,yes,,\n' +
  'ART 2100,Drawing Studio,ART,3,2000,yes,,\n';

export const OFFERINGS =
  'term,course_code,sections,capacity\n2025-FA,CMP 2310,2,60\n2026-SP,ART 2100,1,20\n';

export const STUDENTS =
  'student_id,program,entry_term,status\nHX1000001,Computing BSc,2024-FA,active\nHX1000002,Arts BA,2024-FA,on_leave\n';

export const RECORDS_HEADER = 'student_id,term,course_code,grade,satisfaction,credits_attempted\n';
