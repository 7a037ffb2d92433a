import { IMPORT_FIELDS, IMPORT_KINDS, type ImportKind } from '@kinpath/contracts';
import fc from 'fast-check';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_SCALE_MODEL } from '../../src/grade-scale/grade-scale.model';
import { validateFile } from '../../src/imports/validation/validate-file';
import { pseudonymFor } from '../../src/pseudonym/pseudonym';
import { bearer, DEMO_USERS, signIn } from '../support/api';
import { emptyDemoDir, upload } from '../support/imports';
import { adminClient, startServer, type TestServer } from '../support/server';

/**
 * Malformed input thrown at the import validation and the JSON API: nothing may
 * answer 5xx, crash the server or write to the term-data tables, and every
 * refusal must say what is wrong.
 */
const VALIDATOR_RUNS = 2_000;
const UPLOAD_RUNS = 200;
const JSON_RUNS = 800;

const dir = mkdtempSync(join(tmpdir(), 'kinpath-bad-input-'));
let server: TestServer;
let registrar: string;
let admin: string;
const tried = { validator: 0, uploads: 0, json: 0 };

// --- generators ------------------------------------------------------------

const kindArb = fc.constantFrom(...IMPORT_KINDS);
const formula = fc
  .tuple(fc.constantFrom('=', '+', '-', '@', '\t=', '\r='), fc.string({ maxLength: 30 }))
  .map(([p, s]) => `${p}${s}`);
const quoted = fc.string({ maxLength: 40 }).map((s) => `"${s.replace(/"/g, '""')}"`);
const broken = fc.constantFrom(
  '"unclosed',
  'a"b',
  '""""',
  '"\n"',
  '"a""',
  ',,,,',
  '\u0000',
  '\ufeff',
);
const plausible = fc.constantFrom(
  'CMP 2310',
  'cmp2310',
  '2025-FA',
  '2025-XX',
  'B+',
  'Z',
  '4.5',
  '-1',
  'HR0000001',
  'yes',
  '',
);
const unicodeText = fc.string({ unit: 'grapheme', maxLength: 30 });
const cell = fc.oneof(
  plausible,
  formula,
  quoted,
  broken,
  unicodeText,
  fc.string({ maxLength: 20 }),
);

function csvText(header: string[], rows: string[][], delimiter: string, eol: string): string {
  return [header, ...rows].map((r) => r.join(delimiter)).join(eol);
}

/** A file as bytes, in one of the ways a file can be wrong. */
const malformedFile = kindArb.chain((kind: ImportKind) => {
  const fields = IMPORT_FIELDS[kind].map((f) => f.name);
  const header = fc.oneof(
    fc.constant(fields),
    fc.subarray(fields), // missing columns
    fc.array(fc.oneof(fc.constantFrom(...fields), fc.string({ maxLength: 12 })), { maxLength: 10 }),
  );
  const rows = fc.array(fc.array(cell, { maxLength: 12 }), { maxLength: 25 });
  const layout = fc.record({
    delimiter: fc.constantFrom(',', ';', '\t', '|'),
    eol: fc.constantFrom('\n', '\r\n', '\r'),
    encoding: fc.constantFrom('utf8', 'utf8-bom', 'utf16le', 'latin1'),
  });
  const textual = fc.tuple(header, rows, layout).map(([h, r, l]) => {
    const text = csvText(h, r, l.delimiter, l.eol);
    if (l.encoding === 'utf16le') return Buffer.from(`\ufeff${text}`, 'utf16le');
    if (l.encoding === 'latin1') return Buffer.from(`${text}${l.eol}Café,Åsa,Ñ`, 'latin1');
    if (l.encoding === 'utf8-bom') return Buffer.from(`\ufeff${text}`, 'utf8');
    return Buffer.from(text, 'utf8');
  });
  const randomBytes = fc.uint8Array({ maxLength: 4096 }).map((b) => Buffer.from(b));
  const headerThenBytes = fc
    .uint8Array({ maxLength: 2048 })
    .map((b) => Buffer.concat([Buffer.from(`${fields.join(',')}\n`), Buffer.from(b)]));
  const hugeField = fc
    .tuple(fc.integer({ min: 10_000, max: 60_000 }), fc.constantFrom('x', '"', ',', 'é'))
    .map(([n, ch]) => Buffer.from(`${fields.join(',')}\n${ch.repeat(n)},${'y'.repeat(n % 997)}\n`));
  const file = fc.oneof(
    { weight: 5, arbitrary: textual },
    { weight: 2, arbitrary: randomBytes },
    { weight: 2, arbitrary: headerThenBytes },
    { weight: 1, arbitrary: hugeField },
  );
  return fc.tuple(fc.constant(kind), file);
});

// --- set-up ------------------------------------------------------------------

async function termDataCounts(): Promise<Record<string, number>> {
  const client = adminClient(server.databaseName);
  await client.connect();
  try {
    const { rows } = await client.query(`SELECT
      (SELECT count(*) FROM courses)::int AS courses,
      (SELECT count(*) FROM offerings)::int AS offerings,
      (SELECT count(*) FROM students)::int AS students,
      (SELECT count(*) FROM records)::int AS records,
      (SELECT count(*) FROM users)::int AS users`);
    return rows[0] as Record<string, number>;
  } finally {
    await client.end();
  }
}

let before: Record<string, number>;

beforeAll(async () => {
  server = await startServer({ KINPATH_DEMO_DIR: emptyDemoDir() });
  registrar = await signIn(DEMO_USERS.registrar, undefined, server.url);
  admin = await signIn(DEMO_USERS.admin, undefined, server.url);
  before = await termDataCounts();
}, 90_000);

afterAll(async () => {
  await server?.stop();
  rmSync(dir, { recursive: true, force: true });
  console.log(
    `bad input: ${tried.validator} files at the validator, ${tried.uploads} uploads, ${tried.json} JSON bodies`,
  );
});

function expectErrorShape(res: request.Response) {
  expect(res.status, res.text.slice(0, 300)).toBeLessThan(500);
  if (res.status >= 400) {
    expect(res.body).toMatchObject({ statusCode: res.status, error: expect.any(String) });
    const message = Array.isArray(res.body.message) ? res.body.message.join(' ') : res.body.message;
    expect(typeof message === 'string' && message.length > 5, res.text).toBe(true);
    expect(res.text).not.toMatch(/\bat .+\.(js|ts):\d+|node_modules/);
  }
}

// --- tests -------------------------------------------------------------------

describe('malformed CSV files', () => {
  it(`the validator reports every one of ${VALIDATOR_RUNS} clearly and never throws`, async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(malformedFile, async ([kind, bytes]) => {
        const path = join(dir, `v-${++n}.csv`);
        const acceptedPath = join(dir, `v-${n}.accepted.csv`);
        writeFileSync(path, bytes);
        tried.validator++;
        const result = await validateFile({
          path,
          kind,
          acceptedPath,
          maxRejections: 200,
          context: {
            knownCourses: new Set(['CMP 1100', 'CMP 2310']),
            scale: DEFAULT_SCALE_MODEL,
            pseudonymFor: (id) => pseudonymFor('bad-input-key', id),
          },
        });
        if (result.fatal !== null) expect(result.fatal.length).toBeGreaterThan(10);
        for (const r of result.rejections) {
          expect(r.reason.length, JSON.stringify(r)).toBeGreaterThan(3);
          expect(Number.isInteger(r.line)).toBe(true);
        }
        expect(result.rowsAccepted + result.rowsRejected).toBeLessThanOrEqual(result.rowsTotal);
        rmSync(path);
        rmSync(acceptedPath, { force: true });
      }),
      { numRuns: VALIDATOR_RUNS, seed: 20260301 },
    );
  }, 90_000);

  it(`${UPLOAD_RUNS} of them through the API: 202 or a clear 4xx, and nothing committed`, async () => {
    const ids: string[] = [];
    await fc.assert(
      fc.asyncProperty(malformedFile, fc.boolean(), async ([kind, bytes], withMapping) => {
        tried.uploads++;
        const fields: Record<string, string> = withMapping
          ? { mapping: '{"Student Number":"student_id", "x": 5}' }
          : {};
        const res = await upload(server.url, registrar, kind, bytes, fields);
        expectErrorShape(res);
        if (res.status === 202) ids.push(res.body.id as string);
      }),
      { numRuns: UPLOAD_RUNS, seed: 20260302 },
    );
    // Every accepted upload settles without a crash: validated, or failed with a reason.
    const deadline = Date.now() + 60_000;
    for (const id of ids) {
      for (;;) {
        const res = await request(server.url)
          .get(`/api/imports/${id}`)
          .set(...bearer(registrar));
        expect(res.status).toBe(200);
        if (res.body.status === 'failed') expect(res.body.message?.length ?? 0).toBeGreaterThan(5);
        if (['validated', 'failed'].includes(res.body.status)) break;
        expect(res.body.status).not.toMatch(/commit/);
        if (Date.now() > deadline) throw new Error(`import ${id} did not settle`);
        await new Promise((r) => setTimeout(r, 100));
      }
    }
    expect((await request(server.url).get('/api/health')).status).toBe(200);
    expect(await termDataCounts()).toEqual(before);
  }, 120_000);
});

describe('malformed JSON bodies', () => {
  const jsonValue = fc.oneof(
    fc.json({ maxDepth: 3 }).map((s) => ({ raw: s })),
    fc.string({ maxLength: 60 }).map((s) => ({ raw: s })), // mostly not JSON at all
    fc
      .dictionary(
        fc.constantFrom(
          'email',
          'password',
          'token',
          'role',
          'displayName',
          'department',
          'active',
          'studentId',
          '__proto__',
          'constructor',
          'k',
          'similarity',
        ),
        fc.oneof(
          fc.string({ maxLength: 40 }),
          fc.integer(),
          fc.boolean(),
          fc.constant(null),
          fc.array(fc.string(), { maxLength: 3 }),
          fc.object({ maxDepth: 2 }),
        ),
        { maxKeys: 6 },
      )
      .map((o) => ({ raw: JSON.stringify(o) })),
    fc.constantFrom(
      { raw: '{"email": "a@b.c", "password": "' + 'x'.repeat(5000) + '"}' },
      { raw: '{"__proto__": {"admin": true}}' },
      { raw: '['.repeat(2000) },
      { raw: '{"a":' + '1'.repeat(400) + '}' },
      { raw: '\u0000\u0001' },
    ),
  );
  const target = fc.constantFrom(
    { method: 'post', path: '/api/auth/login', as: null },
    { method: 'post', path: '/api/auth/password-reset', as: null },
    { method: 'post', path: '/api/auth/invitations/accept', as: null },
    { method: 'post', path: '/api/auth/password-reset/confirm', as: null },
    { method: 'post', path: '/api/users', as: 'admin' },
    { method: 'patch', path: '/api/users/6f1c2a0e-8d4b-4c7a-9e21-3b5d7f9a1c2e', as: 'admin' },
    { method: 'post', path: '/api/students/lookup', as: 'registrar' },
    { method: 'post', path: '/api/imports/mappings', as: 'registrar' },
  ) as fc.Arbitrary<{ method: 'post' | 'patch'; path: string; as: 'admin' | 'registrar' | null }>;
  const contentType = fc.constantFrom(
    'application/json',
    'application/json; charset=utf-8',
    'text/plain',
    'application/x-www-form-urlencoded',
  );

  it(`${JSON_RUNS} bodies: never 5xx, always the error shape with a message`, async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(target, jsonValue, contentType, async (t, body, type) => {
        tried.json++;
        n++;
        const agent = request(server.url);
        let req = agent[t.method](t.path)
          // A documentation address per call, so the per-address limits are not what answers.
          .set('X-Forwarded-For', `198.51.100.${n % 250}`)
          .set('Content-Type', type);
        if (t.as) req = req.set(...bearer(t.as === 'admin' ? admin : registrar));
        const res = await req.send(body.raw);
        expectErrorShape(res);
      }),
      { numRuns: JSON_RUNS, seed: 20260303 },
    );
    expect((await request(server.url).get('/api/health')).status).toBe(200);
    expect(await termDataCounts()).toEqual(before);
  }, 90_000);
});
