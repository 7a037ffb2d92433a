import { createHash, createHmac } from 'node:crypto';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, withDatabase } from '../support/api';
import {
  CATALOGUE,
  emptyDemoDir,
  importCommitted,
  RECORDS_HEADER,
  registrarToken,
  settle,
  upload,
} from '../support/imports';
import { startServer, type TestServer } from '../support/server';

const KEY = 'halden-privacy-test-pseudonym-key';
const dataDir = mkdtempSync(join(tmpdir(), 'kinpath-import-privacy-'));
const uploads = join(dataDir, 'uploads');
const STRAY = '11111111-2222-4333-8444-555555555555';
let server: TestServer;
let url: string;
let token: string;
const db = <T>(fn: Parameters<typeof withDatabase<T>>[0]) => withDatabase(fn, server.databaseName);
const files = (id?: string) =>
  readdirSync(uploads)
    .filter((f) => id === undefined || f.startsWith(id))
    .sort();

beforeAll(async () => {
  // Left behind by a crash: a raw upload and a half-received one, of no open import.
  mkdirSync(uploads, { recursive: true });
  writeFileSync(
    join(uploads, `${STRAY}.upload.csv`),
    `${RECORDS_HEADER}PV7000001,2025-SP,X 1,A,,\n`,
  );
  writeFileSync(join(uploads, 'abc.incoming'), 'PV7000002');
  server = await startServer({
    KINPATH_DEMO_DIR: emptyDemoDir(),
    KINPATH_DATA_DIR: dataDir,
    KINPATH_PSEUDONYM_KEY: KEY,
  });
  url = server.url;
  token = await registrarToken(url);
  await importCommitted(url, token, 'catalogue', CATALOGUE);
}, 120_000);

afterAll(async () => {
  await server?.stop();
  rmSync(dataDir, { recursive: true, force: true });
});

const rejectionsOf = (id: string) =>
  db(
    async (c) =>
      (await c.query(`SELECT value, reason FROM import_rejections WHERE import_id = $1`, [id]))
        .rows,
  );

describe('privacy of the import path', () => {
  it('removed the files a crash left behind at start-up', () => {
    expect(files()).toEqual([]);
  });

  it('stores no student number from a file without a header row, nor one in the wrong column', async () => {
    const headerless = await upload(
      url,
      token,
      'records',
      'PV7000004,2025-SP,CMP 2310,A,4,3\nPV7000005,2025-SP,CMP 2310,B,4,3\n',
    );
    const failed = await settle(url, token, headerless.body.id);
    expect(failed.status).toBe('failed');
    expect(failed.message).toMatch(/the first line holds data, not column names/);
    const mapped = await upload(url, token, 'records', 'PV7000004,2025-SP,CMP 2310,A,4,3\n', {
      mapping: JSON.stringify({ PV7000004: 'student_id' }),
    });
    expect(mapped.status).toBe(400);
    expect(mapped.body.message).toMatch(/the first line of the file holds data/);
    expect(mapped.body.message).not.toContain('PV7');
    const misplaced = await upload(
      url,
      token,
      'records',
      `${RECORDS_HEADER}PV7000006,2025-SP,PV7000007,A,4,3\n`,
    );
    const checked = await settle(url, token, misplaced.body.id);
    expect(checked.status).toBe('validated');
    expect(await rejectionsOf(misplaced.body.id)).toEqual([
      {
        value: '[student number]',
        reason: "'[student number]' is not a course code (letters then digits, e.g. CMP 2310)",
      },
    ]);
    const leaks = await db(
      async (c) =>
        (
          await c.query(
            `SELECT 'imports' AS t FROM imports i WHERE i::text ~ 'PV7'
             UNION ALL SELECT 'rejections' FROM import_rejections r WHERE r::text ~ 'PV7'
             UNION ALL SELECT 'audit' FROM audit_events a WHERE a::text ~ 'PV7'`,
          )
        ).rows,
    );
    expect(leaks).toEqual([]);
    expect(server.output()).not.toMatch(/PV7/);
  });

  it('keeps a file name only with student numbers withheld, in the history and the audit trail', async () => {
    const res = await upload(
      url,
      token,
      'records',
      `${RECORDS_HEADER}PV7000009,2025-SP,CMP 2310,A,4,3\n`,
      {},
      'records-PV7000009.csv',
    );
    const done = await settle(url, token, res.body.id);
    expect(done.fileName).toBe('records-[student number].csv');
    const audit = await db(
      async (c) =>
        (await c.query(`SELECT detail FROM audit_events WHERE target = $1`, [res.body.id])).rows,
    );
    expect(JSON.stringify(audit)).toContain('records-[student number].csv');
    expect(JSON.stringify(audit)).not.toContain('PV7000009');
  });

  it('recognises the same file by a keyed digest, never the plain SHA-256', async () => {
    const csv = 'student_id,program,entry_term,status\nPV7000010,,,\n';
    const sha256 = createHash('sha256').update(csv).digest('hex');
    const res = await upload(url, token, 'students', csv);
    const done = await settle(url, token, res.body.id);
    const keyed = createHmac('sha256', KEY).update(`import-file:${sha256}`).digest('hex');
    expect(done.fileDigest).toBe(keyed);
    const plain = await db(
      async (c) =>
        (
          await c.query(
            `SELECT count(*)::int AS n FROM (SELECT i::text AS t FROM imports i
               UNION ALL SELECT a::text FROM audit_events a) x WHERE t LIKE '%' || $1 || '%'`,
            [sha256],
          )
        ).rows[0].n,
    );
    expect(plain).toBe(0);
  });

  it('keeps the upload (mode 0600) only while the import is open, and no accepted rows after it ends', async () => {
    const csv = `${RECORDS_HEADER}PV7000011,2025-SP,CMP 2310,A,4,3\nPV7000012,2025-SP,CMP 2310,Q,4,3\n`;
    const res = await upload(url, token, 'records', csv);
    await settle(url, token, res.body.id);
    const id = res.body.id as string;
    expect(files(id)).toEqual([`${id}.accepted.csv`, `${id}.upload.csv`]);
    for (const f of files(id)) expect(statSync(join(uploads, f)).mode & 0o777).toBe(0o600);
    const commit = await request(url)
      .post(`/api/imports/${id}/commit`)
      .set(...bearer(token));
    expect(commit.status).toBe(202);
    expect((await settle(url, token, id)).status).toBe('committed');
    expect(files(id)).toEqual([]);

    const fatal = await upload(url, token, 'records', 'nothing,useful\n1,2\n');
    expect((await settle(url, token, fatal.body.id)).status).toBe('failed');
    expect(files(fatal.body.id)).toEqual([]);
  });

  it('refuses NUL in a cell at validation, with line and column', async () => {
    const res = await upload(
      url,
      token,
      'catalogue',
      'course_code,title,department\nBIO 1000,Cells\u0000,BIO\nBIO 1010,Plants,BIO\n',
    );
    const done = await settle(url, token, res.body.id);
    expect(done).toMatchObject({ status: 'validated', rowsAccepted: 1, rowsRejected: 1 });
    const errors = await request(url)
      .get(`/api/imports/${res.body.id}/errors`)
      .set(...bearer(token));
    expect(errors.body).toEqual([
      {
        line: 2,
        column: 'title',
        value: 'Cells ',
        reason: 'holds a control character (NUL) at position 6; remove it',
      },
    ]);
    expect(files(res.body.id)).toHaveLength(2);
    const discarded = await request(url)
      .post(`/api/imports/${res.body.id}/discard`)
      .set(...bearer(token));
    expect(discarded.body.status).toBe('discarded');
    expect(files(res.body.id)).toEqual([]);
  });
});
