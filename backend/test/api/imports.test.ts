import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, DEMO_USERS, signIn, withDatabase } from '../support/api';
import {
  CATALOGUE,
  emptyDemoDir,
  importCommitted,
  OFFERINGS,
  RECORDS_HEADER,
  registrarToken,
  settle,
  STUDENTS,
  upload,
} from '../support/imports';
import { startServer, type TestServer } from '../support/server';

let server: TestServer;
let url: string;
let token: string;
const db = <T>(fn: Parameters<typeof withDatabase<T>>[0]) => withDatabase(fn, server.databaseName);

/** Every row of a table as text, sorted: equal snapshots mean equal contents. */
async function snapshot(table: string): Promise<string[]> {
  return db(async (c) =>
    (await c.query(`SELECT t::text AS row FROM ${table} t ORDER BY 1`)).rows.map((r) => r.row),
  );
}

beforeAll(async () => {
  server = await startServer({ KINPATH_DEMO_DIR: emptyDemoDir() });
  url = server.url;
  token = await registrarToken(url);
  await importCommitted(url, token, 'catalogue', CATALOGUE);
  await importCommitted(url, token, 'offerings', OFFERINGS);
  await importCommitted(url, token, 'students', STUDENTS);
  await importCommitted(
    url,
    token,
    'records',
    RECORDS_HEADER +
      'HX1000001,2025-SP,CMP 1100,B+,4,3\nHX1000001,2025-SP,MTH 1200,A-,,4\nHX1000002,2025-SP,CMP 1100,C,2,3\nHX1000003,2025-SP,CMP 1100,W,,3\n',
  );
}, 120_000);

afterAll(async () => {
  await server?.stop();
});

describe('imports through the API', () => {
  it('committed the four kinds, with history, catalogue and terms', async () => {
    const list = await request(url)
      .get('/api/imports')
      .set(...bearer(token));
    expect(list.status).toBe(200);
    expect(list.body.map((i: { kind: string }) => i.kind).slice(0, 4)).toEqual([
      'records',
      'students',
      'offerings',
      'catalogue',
    ]);
    const records = list.body[0];
    expect(records).toMatchObject({
      status: 'committed',
      rowsTotal: 4,
      rowsAccepted: 4,
      rowsRejected: 0,
      partial: false,
      createdBy: DEMO_USERS.registrar,
      committedBy: DEMO_USERS.registrar,
      progress: { done: 4, total: 4 },
    });
    expect(records.durationMs).toBeGreaterThanOrEqual(0);
    // A record for an unknown student created that student as active.
    const students = await db(
      async (c) => (await c.query(`SELECT status FROM students ORDER BY status`)).rows,
    );
    expect(students.map((s) => s.status)).toEqual(['active', 'active', 'on_leave']);

    const courses = await request(url)
      .get('/api/courses?department=cmp&elective=true')
      .set(...bearer(token));
    expect(courses.body.map((c: { courseCode: string }) => c.courseCode)).toEqual(['CMP 2310']);
    const terms = await request(url)
      .get('/api/terms')
      .set(...bearer(token));
    expect(terms.body).toMatchObject({ current: '2025-SP', next: '2025-FA' });
    expect(terms.body.terms.map((t: { term: string }) => t.term)).toEqual([
      '2025-SP',
      '2025-FA',
      '2026-SP',
    ]);
  });

  it('imports a semicolon file with other headers through a mapping, and saves the mapping', async () => {
    const csv = 'Student No;Semester;Course;Final Grade\nHX1000001;2025-FA;CMP 2310;A\n';
    const preview = await request(url)
      .post('/api/imports/preview')
      .set(...bearer(token))
      .attach('file', Buffer.from(csv), 'sis.csv');
    expect(preview.status).toBe(200);
    expect(preview.body).toMatchObject({
      delimiter: ';',
      headers: ['Student No', 'Semester', 'Course', 'Final Grade'],
      rows: [['HX1000001', '2025-FA', 'CMP 2310', 'A']],
    });
    expect(preview.body.suggestedMappings.records).toEqual({
      'Student No': 'student_id',
      Semester: 'term',
      Course: 'course_code',
      'Final Grade': 'grade',
    });
    const mapping = preview.body.suggestedMappings.records;
    const saved = await request(url)
      .post('/api/imports/mappings')
      .set(...bearer(token))
      .send({ name: 'SIS export', kind: 'records', mapping });
    expect(saved.status).toBe(201);
    const mappings = await request(url)
      .get('/api/imports/mappings')
      .set(...bearer(token));
    expect(mappings.body).toEqual([
      expect.objectContaining({ name: 'SIS export', kind: 'records', mapping }),
    ]);

    const res = await upload(url, token, 'records', csv, {
      mapping: JSON.stringify(mapping),
      commit: 'true',
    });
    expect(res.status).toBe(202);
    const done = await settle(url, token, res.body.id);
    expect(done).toMatchObject({ status: 'committed', rowsAccepted: 1 });
    const bad = await upload(url, token, 'records', csv + '\n', {
      mapping: '{"Course":"nonsense"}',
    });
    expect(bad.status).toBe(400);
    expect(bad.body.message).toMatch(/'nonsense' .* is not a field of records/);
  });

  it('refuses a committed file again with 409 naming the earlier import by file name and date', async () => {
    const csv = `${RECORDS_HEADER}HX1000002,2025-FA,CMP 2310,B,3,3\n`;
    const first = await upload(url, token, 'records', csv, { commit: 'true' }, 'fa-grades.csv');
    expect(first.status).toBe(202);
    const done = await settle(url, token, first.body.id);
    expect(done.status).toBe('committed');
    const again = await upload(url, token, 'records', csv, {}, 'renamed.csv');
    expect(again.status).toBe(409);
    expect(again.body.message).toContain(
      `the records import of 'fa-grades.csv' committed ${done.committedAt.slice(0, 16).replace('T', ' ')} UTC`,
    );
    expect(again.body.message).not.toContain(first.body.id);
    const rollback = await request(url)
      .post(`/api/imports/${first.body.id}/rollback`)
      .set(...bearer(token));
    expect(rollback.status).toBe(200);
  });

  it('reports rejections as JSON and CSV, does not commit them on commit=true, commits the rest explicitly', async () => {
    const csv = `${RECORDS_HEADER}HX1000001,2025-FA,MTH 1200,B,3,4\nHX1000002,2025-FA,MTH 1200,Q,3,4\nHX1000002,2025-FA,ART 2100,=cmd(),3,4\n`;
    const res = await upload(url, token, 'records', csv, { commit: 'true' });
    const done = await settle(url, token, res.body.id);
    expect(done).toMatchObject({
      status: 'validated',
      rowsAccepted: 1,
      rowsRejected: 2,
      commitRequested: true,
    });
    expect(done.message).toMatch(/2 rows were rejected, so the file was not committed/);

    const errors = await request(url)
      .get(`/api/imports/${res.body.id}/errors`)
      .set(...bearer(token));
    expect(errors.body).toEqual([
      {
        line: 3,
        column: 'grade',
        value: 'Q',
        reason:
          "'Q' is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP), nor grade points from 0 to 4",
      },
      expect.objectContaining({ line: 4, column: 'grade', value: '=cmd()' }),
    ]);
    const csvReport = await request(url)
      .get(`/api/imports/${res.body.id}/errors`)
      .set(...bearer(token))
      .set('Accept', 'text/csv');
    expect(csvReport.headers['content-type']).toMatch(/text\/csv/);
    expect(csvReport.text).toContain("4,grade,'=cmd(),");
    expect(csvReport.text.split('\r\n')[0]).toBe('line,column,value,reason');

    const before = await snapshot('records');
    const commit = await request(url)
      .post(`/api/imports/${res.body.id}/commit`)
      .set(...bearer(token));
    expect(commit.status).toBe(202);
    const committed = await settle(url, token, res.body.id);
    expect(committed).toMatchObject({ status: 'committed', partial: true });
    expect((await snapshot('records')).length).toBe(before.length + 1);
    const twice = await request(url)
      .post(`/api/imports/${res.body.id}/commit`)
      .set(...bearer(token));
    expect(twice.status).toBe(409);
  });

  it('replaces rows and a rollback restores the tables exactly', async () => {
    const tables = ['records', 'students', 'courses', 'offerings'];
    const before = await Promise.all(tables.map(snapshot));
    const csv = `${RECORDS_HEADER}HX1000001,2025-SP,CMP 1100,A,5,3\nHX1000002,2025-SP,CMP 1100,3.1,,3\nHX1000009,2026-SP,ART 2100,P,4,3\n`;
    const done = await importCommitted(url, token, 'records', csv);
    const changed = await db(
      async (c) =>
        (
          await c.query(
            `SELECT grade, grade_points::text AS points FROM records WHERE import_id = $1 ORDER BY grade`,
            [done.id],
          )
        ).rows,
    );
    expect(changed).toEqual([
      { grade: '3.1', points: '3.10' },
      { grade: 'A', points: '4.00' },
      { grade: 'P', points: null },
    ]);
    expect(await snapshot('records')).not.toEqual(before[0]);

    const rollback = await request(url)
      .post(`/api/imports/${done.id}/rollback`)
      .set(...bearer(token));
    expect(rollback.status, rollback.text).toBe(200);
    expect(rollback.body).toMatchObject({
      status: 'rolled_back',
      rolledBackBy: DEMO_USERS.registrar,
    });
    expect(await Promise.all(tables.map(snapshot))).toEqual(before);
    const again = await request(url)
      .post(`/api/imports/${done.id}/rollback`)
      .set(...bearer(token));
    expect(again.status).toBe(409);
  });

  it('refuses a rollback when a later import replaced the same rows, until that one is rolled back', async () => {
    const before = await snapshot('records');
    const first = await importCommitted(
      url,
      token,
      'records',
      `${RECORDS_HEADER}HX1000003,2026-SP,ART 2100,B,3,3\n`,
    );
    // A later import touching other rows does not block.
    const other = await importCommitted(
      url,
      token,
      'records',
      `${RECORDS_HEADER}HX1000003,2026-SP,CMP 2310,C,3,3\n`,
    );
    const later = await importCommitted(
      url,
      token,
      'records',
      `${RECORDS_HEADER}HX1000003,2026-SP,ART 2100,D,1,3\n`,
    );
    const refused = await request(url)
      .post(`/api/imports/${first.id}/rollback`)
      .set(...bearer(token));
    expect(refused.status).toBe(409);
    expect(refused.body.message).toBe(
      `This import cannot be rolled back yet: a later import replaced rows it wrote. Roll back the records import of 'records.csv' committed ${later.committedAt.slice(0, 16).replace('T', ' ')} UTC first.`,
    );
    expect(refused.body.message).not.toContain(later.id);
    expect(
      (
        await request(url)
          .post(`/api/imports/${later.id}/rollback`)
          .set(...bearer(token))
      ).status,
    ).toBe(200);
    expect(
      (
        await request(url)
          .post(`/api/imports/${first.id}/rollback`)
          .set(...bearer(token))
      ).status,
    ).toBe(200);
    expect(
      (
        await request(url)
          .post(`/api/imports/${other.id}/rollback`)
          .set(...bearer(token))
      ).status,
    ).toBe(200);
    expect(await snapshot('records')).toEqual(before);
  });

  it('re-derives stored grade points when the registrar edits the grade scale', async () => {
    const scale = (
      await request(url)
        .get('/api/grade-scale')
        .set(...bearer(token))
    ).body;
    expect(scale.passingThreshold).toBe('D-');
    const edited = {
      letters: [
        { letter: 'A+', points: 4.3 },
        ...scale.letters.map((l: { letter: string; points: number }) =>
          l.letter === 'B+' ? { ...l, points: 3.4 } : l,
        ),
      ],
      marks: scale.marks,
      passingThreshold: 'C-',
    };
    const res = await request(url)
      .put('/api/grade-scale')
      .set(...bearer(token))
      .send(edited);
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ passingThreshold: 'C-', maxPoints: 4.3 });
    expect(res.body.recordsUpdated).toBeGreaterThan(0);
    const points = await db(
      async (c) =>
        (await c.query(`SELECT DISTINCT grade_points::text AS p FROM records WHERE grade = 'B+'`))
          .rows,
    );
    expect(points).toEqual([{ p: '3.40' }]);
    const passing = await db(
      async (c) => (await c.query(`SELECT passing FROM grade_scale WHERE letter = 'D'`)).rows[0],
    );
    expect(passing.passing).toBe(false);
    const dropping = await request(url)
      .put('/api/grade-scale')
      .set(...bearer(token))
      .send({
        ...edited,
        letters: edited.letters.filter((l: { letter: string }) => l.letter !== 'B+'),
      });
    expect(dropping.status).toBe(409);
    const restored = await request(url)
      .put('/api/grade-scale')
      .set(...bearer(token))
      .send({ letters: scale.letters, marks: scale.marks, passingThreshold: 'D-' });
    expect(restored.status).toBe(200);
  });

  it('answers 403 to the other roles on registrar routes', async () => {
    const any = '00000000-0000-4000-8000-000000000000';
    for (const email of [DEMO_USERS.advisor, DEMO_USERS.department_head, DEMO_USERS.admin]) {
      const other = await signIn(email, undefined, url);
      const calls = [
        upload(url, other, 'records', `${RECORDS_HEADER}HX1,2025-FA,CMP 2310,A,,\n`),
        request(url)
          .post('/api/imports/preview')
          .set(...bearer(other))
          .attach('file', Buffer.from('a,b\n'), 'a.csv'),
        request(url)
          .get('/api/imports')
          .set(...bearer(other)),
        request(url)
          .get(`/api/imports/${any}`)
          .set(...bearer(other)),
        request(url)
          .get(`/api/imports/${any}/errors`)
          .set(...bearer(other)),
        request(url)
          .post(`/api/imports/${any}/commit`)
          .set(...bearer(other)),
        request(url)
          .post(`/api/imports/${any}/rollback`)
          .set(...bearer(other)),
        request(url)
          .get('/api/imports/mappings')
          .set(...bearer(other)),
        request(url)
          .put('/api/grade-scale')
          .set(...bearer(other))
          .send({}),
      ];
      const answers = await Promise.all(calls);
      answers.forEach((res, i) => expect(res.status, `${email}, call ${i}`).toBe(403));
      expect(
        (
          await request(url)
            .get('/api/courses')
            .set(...bearer(other))
        ).status,
      ).toBe(200);
      expect(
        (
          await request(url)
            .get('/api/terms')
            .set(...bearer(other))
        ).status,
      ).toBe(200);
      expect(
        (
          await request(url)
            .get('/api/grade-scale')
            .set(...bearer(other))
        ).status,
      ).toBe(200);
    }
    expect((await request(url).get('/api/imports')).status).toBe(401);
  });

  it('keeps no raw student number in any table or in the server log', async () => {
    const raw = /HX10000[0-9]{2}/i;
    const leaks = await db(async (c) => {
      const { rows: tables } = await c.query<{ schema: string; name: string }>(
        `SELECT table_schema AS schema, table_name AS name FROM information_schema.tables
         WHERE table_schema IN ('public', 'pgboss') AND table_type = 'BASE TABLE'`,
      );
      expect(tables.length).toBeGreaterThan(8);
      const found: string[] = [];
      for (const t of tables) {
        const { rows } = await c.query(
          `SELECT count(*)::int AS n FROM "${t.schema}"."${t.name}" x WHERE x::text ~* $1`,
          [raw.source],
        );
        if (rows[0].n > 0) found.push(`${t.schema}.${t.name}`);
      }
      return found;
    });
    expect(leaks).toEqual([]);
    expect(server.output()).not.toMatch(raw);
  });
});
