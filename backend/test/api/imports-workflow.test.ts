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

let server: TestServer;
let url: string;
let token: string;
const db = <T>(fn: Parameters<typeof withDatabase<T>>[0]) => withDatabase(fn, server.databaseName);
const post = (path: string) =>
  request(url)
    .post(path)
    .set(...bearer(token));

beforeAll(async () => {
  server = await startServer({ KINPATH_DEMO_DIR: emptyDemoDir() });
  url = server.url;
  token = await registrarToken(url);
  await importCommitted(url, token, 'catalogue', CATALOGUE);
}, 120_000);

afterAll(async () => {
  await server?.stop();
});

describe('correcting an import before it is committed', () => {
  const file =
    'Student;Semester;Course;Mark;Rating (1-5)\nHX2000001;2025-SP;CMP 2310;A;4\nHX2000002;2025-SP;CMP 2310;B;5\n';
  const wrong = JSON.stringify({
    Student: 'student_id',
    Semester: 'term',
    Course: 'course_code',
    'Rating (1-5)': 'grade',
  });
  const right = JSON.stringify({
    Student: 'student_id',
    Semester: 'term',
    Course: 'course_code',
    Mark: 'grade',
    'Rating (1-5)': 'satisfaction',
  });

  it('discards a checked import, keeps it in the history, and lets the same file in again', async () => {
    const first = await upload(url, token, 'records', file, { mapping: wrong });
    const checked = await settle(url, token, first.body.id);
    expect(checked).toMatchObject({
      status: 'validated',
      rowsRejected: 1,
      rejectedRowsAvailable: true,
    });
    expect(checked.leftOut).toEqual({
      columns: ['Mark'],
      fields: ['satisfaction', 'credits_attempted'],
    });
    // Never committed: it does not block the same file.
    const second = await upload(url, token, 'records', file, { mapping: wrong });
    expect(second.status, second.text).toBe(202);
    await settle(url, token, second.body.id);
    const discarded = await post(`/api/imports/${first.body.id}/discard`);
    expect(discarded.status).toBe(200);
    expect(discarded.body).toMatchObject({
      status: 'discarded',
      discardedBy: 'registrar@halden.example',
      rejectedRowsAvailable: false,
    });
    expect((await post(`/api/imports/${first.body.id}/discard`)).status).toBe(409);
    const rows = await request(url)
      .get(`/api/imports/${first.body.id}/rejected-rows`)
      .set(...bearer(token));
    expect(rows.status).toBe(409);
    const history = await request(url)
      .get('/api/imports')
      .set(...bearer(token));
    expect(history.body.find((i: { id: string }) => i.id === first.body.id).status).toBe(
      'discarded',
    );

    // Checked again with the right mapping, from the file kept on the server.
    const again = await post(`/api/imports/${second.body.id}/check-again`).send({ mapping: right });
    expect(again.status, again.text).toBe(202);
    expect(again.body.id).not.toBe(second.body.id);
    const rechecked = await settle(url, token, again.body.id);
    expect(rechecked).toMatchObject({ status: 'validated', rowsAccepted: 2, rowsRejected: 0 });
    expect(
      (
        await request(url)
          .get(`/api/imports/${second.body.id}`)
          .set(...bearer(token))
      ).body.status,
    ).toBe('discarded');
    expect((await post(`/api/imports/${again.body.id}/commit`)).status).toBe(202);
    expect((await settle(url, token, again.body.id)).status).toBe('committed');
    const satisfaction = await db(
      async (c) =>
        (
          await c.query(`SELECT satisfaction FROM records WHERE import_id = $1 ORDER BY 1`, [
            again.body.id,
          ])
        ).rows,
    );
    expect(satisfaction).toEqual([{ satisfaction: 4 }, { satisfaction: 5 }]);
    // Once committed, the same file is refused until that import is rolled back.
    const refused = await upload(url, token, 'records', file, { mapping: right });
    expect(refused.status).toBe(409);
    expect(refused.body.message).toMatch(
      /^This file was committed already: the records import of 'records.csv' committed \d{4}-\d\d-\d\d \d\d:\d\d UTC/,
    );
  });

  it('offers the rejected rows in the file’s own columns with a reason, from the kept upload only', async () => {
    const csv =
      'student_id;term;course_code;grade;note\nHX3000001;2025-SP;CMP 2310;A;ok\nHX3000002;2025-SP;CMP 9999;B;"has; semicolon"\nHX3000003;2025-FALL;CMP 2310;Q;x\n';
    const res = await upload(url, token, 'records', csv);
    await settle(url, token, res.body.id);
    const rows = await request(url)
      .get(`/api/imports/${res.body.id}/rejected-rows`)
      .set(...bearer(token));
    expect(rows.status).toBe(200);
    expect(rows.headers['content-type']).toMatch(/text\/csv/);
    expect(rows.text.replace(/^\ufeff/, '').split('\r\n')).toEqual([
      'student_id;term;course_code;grade;note;reason',
      'HX3000002;2025-SP;CMP 9999;B;"has; semicolon";course_code: course \'CMP 9999\' is not in the catalogue',
      "HX3000003;2025-FALL;CMP 2310;Q;x;\"grade: 'Q' is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP), nor grade points from 0 to 4; term: '2025-FALL' is not a term of the form YYYY-XX (XX one of WI, SP, SU, FA)\"",
      '',
    ]);
    // Not stored anywhere: the rows come from the upload, which the commit removes.
    const stored = await db(
      async (c) =>
        (
          await c.query(
            `SELECT count(*)::int AS n FROM import_rejections r WHERE r::text ~ 'HX300'`,
          )
        ).rows[0].n,
    );
    expect(stored).toBe(0);
    expect((await post(`/api/imports/${res.body.id}/commit`)).status).toBe(202);
    await settle(url, token, res.body.id);
    const gone = await request(url)
      .get(`/api/imports/${res.body.id}/rejected-rows`)
      .set(...bearer(token));
    expect(gone.status).toBe(409);
    expect(gone.body.message).toMatch(/only while the import is validated/);
  });
});

describe('rollback refusals in plain words', () => {
  it('names the later import that refers to rows by file name and date, with no database text', async () => {
    const catalogue = await importCommitted(
      url,
      token,
      'catalogue',
      'course_code,title,department\nGEO 1100,Landforms,GEO\n',
    );
    const res = await upload(
      url,
      token,
      'records',
      `${RECORDS_HEADER}HX4000001,2025-SP,GEO 1100,A,,\n`,
      { commit: 'true' },
      'geo-grades.csv',
    );
    const records = await settle(url, token, res.body.id);
    expect(records.status).toBe('committed');
    const refused = await post(`/api/imports/${catalogue.id}/rollback`);
    expect(refused.status).toBe(409);
    expect(refused.body.message).toBe(
      `This import cannot be rolled back yet: later imports added rows that refer to rows it added. Roll back the records import of 'geo-grades.csv' committed ${records.committedAt.slice(0, 16).replace('T', ' ')} UTC first.`,
    );
    expect(refused.body.message).not.toMatch(/constraint|violates|[0-9a-f]{8}-[0-9a-f]{4}/);
    expect((await post(`/api/imports/${res.body.id}/rollback`)).status).toBe(200);
    expect((await post(`/api/imports/${catalogue.id}/rollback`)).status).toBe(200);
  });
});

describe('odd files', () => {
  it('says an empty file is empty and a PNG is not a CSV file', async () => {
    const empty = await upload(url, token, 'records', '');
    expect(empty.status).toBe(400);
    expect(empty.body.message).toMatch(/^The file is empty/);
    const png = Buffer.from([
      0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48,
    ]);
    const image = await upload(url, token, 'records', png, {}, 'chart.png');
    expect(image.status).toBe(400);
    expect(image.body.message).toMatch(/^This is not a CSV file: it looks like a PNG image/);
    const preview = await request(url)
      .post('/api/imports/preview')
      .set(...bearer(token))
      .attach('file', png, 'chart.png');
    expect(preview.status).toBe(400);
    expect(preview.text).not.toContain('\ufffd');
  });

  it('says a header-only file has no rows, and hints at the kind a file looks like', async () => {
    const headerOnly = await upload(url, token, 'records', RECORDS_HEADER);
    const none = await settle(url, token, headerOnly.body.id);
    expect(none).toMatchObject({ status: 'failed' });
    expect(none.message).toBe(
      'The file has a header row but no rows under it: there is nothing to import.',
    );
    const asCatalogue = await upload(
      url,
      token,
      'catalogue',
      `${RECORDS_HEADER}HX5000001,2025-SP,CMP 2310,A,,\n`,
    );
    const wrongKind = await settle(url, token, asCatalogue.body.id);
    expect(wrongKind.status).toBe('failed');
    expect(wrongKind.message).toMatch(
      /Its columns look like a records file: upload it again as records\.$/,
    );
    const preview = await request(url)
      .post('/api/imports/preview')
      .set(...bearer(token))
      .attach('file', Buffer.from(`${RECORDS_HEADER}HX5000001,2025-SP,CMP 2310,A,,\n`), 'r.csv');
    expect(preview.body).toMatchObject({ likelyKind: 'records', encoding: 'utf-8' });
  });

  it('asks to confirm Windows-1252 and UTF-16, then reads them without replacing a character', async () => {
    // "Géographie – Cartes" in Windows-1252: é = 0xE9, the en dash = 0x96.
    const latin = Buffer.concat([
      Buffer.from('course_code,title,department\nGEO 2100,G'),
      Buffer.from([0xe9]),
      Buffer.from('ographie '),
      Buffer.from([0x96]),
      Buffer.from(' Cartes,GEO\n'),
    ]);
    const asked = await upload(url, token, 'catalogue', latin);
    expect(asked.status).toBe(422);
    expect(asked.body.details).toMatchObject({ detectedEncoding: 'windows-1252' });
    expect(asked.body.message).toMatch(/not UTF-8; it looks like Windows-1252/);
    const preview = await request(url)
      .post('/api/imports/preview')
      .set(...bearer(token))
      .field('encoding', 'windows-1252')
      .attach('file', latin, 'geo.csv');
    expect(preview.status).toBe(200);
    expect(preview.body.rows).toEqual([['GEO 2100', 'Géographie – Cartes', 'GEO']]);
    const confirmed = await upload(url, token, 'catalogue', latin, {
      encoding: 'windows-1252',
      commit: 'true',
    });
    expect(confirmed.status).toBe(202);
    expect((await settle(url, token, confirmed.body.id)).status).toBe('committed');
    const utf16 = Buffer.concat([
      Buffer.from([0xff, 0xfe]),
      Buffer.from('course_code,title,department\nGEO 2200,Fjällkartor,GEO\n', 'utf16le'),
    ]);
    const asked16 = await upload(url, token, 'catalogue', utf16);
    expect(asked16.body.details.detectedEncoding).toBe('utf-16le');
    const read16 = await upload(url, token, 'catalogue', utf16, {
      encoding: 'utf-16le',
      commit: 'true',
    });
    expect((await settle(url, token, read16.body.id)).status).toBe('committed');
    const titles = await db(
      async (c) =>
        (await c.query(`SELECT title FROM courses WHERE course_code LIKE 'GEO 2%' ORDER BY 1`))
          .rows,
    );
    expect(titles).toEqual([{ title: 'Fjällkartor' }, { title: 'Géographie – Cartes' }]);
  });
});
