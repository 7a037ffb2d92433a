import type {
  ElectiveEstimate,
  ElectiveExplanation,
  ElectivesResponse,
  GradeScale,
  HistoryEntry,
  ModelSettingsResponse,
  Shortlist,
} from '@kinpath/contracts';
import { ESTIMATE_CAUTIONS, termOrdinal } from '@kinpath/contracts';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parsePrerequisites } from '../../src/imports/validation/prerequisites';
import { termSortKey } from '../../src/model/term-keys';
import { unmetPrerequisites } from '../../src/students/eligibility';
import { api, bearer, DEMO_USERS, signIn, uniqueEmail, withDatabase } from '../support/api';
import {
  activeDemoStudents,
  caughtMailTo,
  lookUp,
  pseudonymOf,
  REPO_ROOT,
  waitForModel,
} from '../support/advising';
import { engineCliArgs } from '../support/engine-cli-args';

const REF = /^[A-Za-z0-9_-]{16}$/;
const HEX64 = /[0-9a-f]{64}/;
const CLI = join(REPO_ROOT, 'packages', 'engine', 'dist', 'cli.js');

let advisor: string;
let registrar: string;
let studentId: string;
let pseudonym: string;
let ref: string;

beforeAll(async () => {
  await waitForModel();
  advisor = await signIn(DEMO_USERS.advisor);
  registrar = await signIn(DEMO_USERS.registrar);
  [studentId] = activeDemoStudents(1);
  pseudonym = pseudonymOf(studentId);
  ref = await lookUp(advisor, studentId);
});

const get = (path: string, token = advisor) =>
  api()
    .get(path)
    .set(...bearer(token));

async function electives(query = ''): Promise<ElectivesResponse> {
  const res = await get(`/api/students/${ref}/electives${query}`);
  expect(res.status, res.text).toBe(200);
  return res.body as ElectivesResponse;
}

/** The grade points of the scale's passing threshold (D- by default). */
async function thresholdPoints(): Promise<number> {
  const scale = (await get('/api/grade-scale')).body as GradeScale;
  return scale.letters.find((l) => l.letter === scale.passingThreshold)?.points as number;
}

/** Courses this student passed, straight from the database (the threshold or better, or P). */
async function passedInDatabase(): Promise<Set<string>> {
  const threshold = await thresholdPoints();
  return withDatabase(async (db) => {
    const { rows } = await db.query<{ course_code: string }>(
      `SELECT DISTINCT course_code FROM records
       WHERE student_pseudonym = $1 AND (grade_points >= $2 OR grade = 'P')`,
      [pseudonym, threshold],
    );
    return new Set(rows.map((r) => r.course_code));
  });
}

describe('looking a student up', () => {
  it('answers an opaque ref, program, status and entry term for a known number', async () => {
    const res = await api()
      .post('/api/students/lookup')
      .set(...bearer(advisor))
      .send({ studentId });
    expect(res.status).toBe(200);
    expect(Object.keys(res.body).sort()).toEqual(['entryTerm', 'program', 'ref', 'status']);
    expect(res.body.ref).toMatch(REF);
    expect(res.body.ref).toBe(ref);
    expect(res.body.ref).not.toBe(pseudonym);
    expect(res.text).not.toContain(studentId);
    const row = await withDatabase(
      async (db) =>
        (
          await db.query(`SELECT program, entry_term, status FROM students WHERE pseudonym = $1`, [
            pseudonym,
          ])
        ).rows[0],
    );
    expect(res.body).toMatchObject({
      program: row.program,
      entryTerm: row.entry_term,
      status: row.status,
    });
  });

  it('gives the same ref for the number typed in another case or with blanks, and to registrar staff', async () => {
    expect(await lookUp(advisor, `  ${studentId.toLowerCase()} `)).toBe(ref);
    expect(await lookUp(registrar, studentId)).toBe(ref);
  });

  it('answers 404 with one plain sentence for an unknown number', async () => {
    const res = await api()
      .post('/api/students/lookup')
      .set(...bearer(advisor))
      .send({ studentId: 'HR0000000' });
    expect(res.status).toBe(404);
    expect(res.body).toEqual({
      statusCode: 404,
      message: 'No records for this student number.',
      error: 'Not Found',
    });
  });

  it('is refused to other roles (403) and to anyone not signed in (401)', async () => {
    for (const email of [DEMO_USERS.admin, DEMO_USERS.department_head]) {
      const token = await signIn(email);
      const res = await api()
        .post('/api/students/lookup')
        .set(...bearer(token))
        .send({ studentId });
      expect(res.status).toBe(403);
      expect((await get(`/api/students/${ref}/electives`, token)).status).toBe(403);
    }
    expect((await api().post('/api/students/lookup').send({ studentId })).status).toBe(401);
  });

  it("lists this advisor's recent lookups by program and entry term, never by number", async () => {
    const res = await get('/api/students/recent');
    expect(res.status).toBe(200);
    expect(res.body[0]).toMatchObject({ ref });
    expect(Object.keys(res.body[0]).sort()).toEqual([
      'entryTerm',
      'lookedUpAt',
      'program',
      'ref',
      'status',
    ]);
    expect(res.text).not.toContain(studentId);
  });

  it('answers 404 for a ref that was never handed out', async () => {
    expect((await get('/api/students/AAAAAAAAAAAAAAAA')).status).toBe(404);
    expect((await get('/api/students/not-a-ref/history')).status).toBe(404);
  });
});

describe('the student page', () => {
  it('computes credits earned and the grade-point average from the records', async () => {
    const res = await get(`/api/students/${ref}`);
    expect(res.status).toBe(200);
    const threshold = await thresholdPoints();
    const expected = await withDatabase(async (db) => {
      // Latest graded attempt per course, weighted by its credits.
      const gpa = await db.query<{ gpa: string | null }>(
        `SELECT sum(w * p) / nullif(sum(w), 0) AS gpa FROM (
           SELECT DISTINCT ON (r.course_code) r.grade_points AS p,
                  coalesce(r.credits_attempted, c.credits, 0) AS w
           FROM records r JOIN courses c USING (course_code)
           WHERE r.student_pseudonym = $1 AND r.grade_points IS NOT NULL
           ORDER BY r.course_code, term_ordinal(r.term) DESC) latest`,
        [pseudonym],
      );
      // Each passed course once, with the credits of its latest passing attempt.
      const credits = await db.query<{ credits: string | null }>(
        `SELECT sum(w) AS credits FROM (
           SELECT DISTINCT ON (r.course_code) coalesce(r.credits_attempted, c.credits, 0) AS w
           FROM records r JOIN courses c USING (course_code)
           WHERE r.student_pseudonym = $1 AND (r.grade_points >= $2 OR r.grade = 'P')
           ORDER BY r.course_code, term_ordinal(r.term) DESC) passed`,
        [pseudonym, threshold],
      );
      return { gpa: Number(gpa.rows[0].gpa), credits: Number(credits.rows[0].credits ?? 0) };
    });
    expect(res.body.ref).toBe(ref);
    expect(res.body.creditsEarned).toBeCloseTo(expected.credits, 9);
    expect(res.body.gradePointAverage).toBeCloseTo(expected.gpa, 9);
  });

  it('lists every attempt in term order with title, grade, points and satisfaction', async () => {
    const res = await get(`/api/students/${ref}/history`);
    expect(res.status).toBe(200);
    const history = res.body as HistoryEntry[];
    const count = await withDatabase(
      async (db) =>
        (
          await db.query(`SELECT count(*)::int AS n FROM records WHERE student_pseudonym = $1`, [
            pseudonym,
          ])
        ).rows[0].n as number,
    );
    expect(history).toHaveLength(count);
    for (let i = 1; i < history.length; i++) {
      expect(termOrdinal(history[i].term)).toBeGreaterThanOrEqual(termOrdinal(history[i - 1].term));
    }
    for (const entry of history) {
      expect(Object.keys(entry).sort()).toEqual([
        'courseCode',
        'creditsAttempted',
        'grade',
        'gradePoints',
        'satisfaction',
        'term',
        'title',
      ]);
      expect(entry.title).not.toBe('');
      if (['W', 'P', 'I', 'IP', 'AU', 'NP'].includes(entry.grade)) {
        expect(entry.gradePoints).toBeNull();
      }
    }
  });
});

describe('the electives', () => {
  it('lists the electives offered in the next term with the settings version and the confidence rule', async () => {
    const [body, terms, settings] = await Promise.all([
      electives(),
      get('/api/terms'),
      get('/api/model/settings'),
    ]);
    expect(body.term).toBe(terms.body.next);
    expect(body.settingsVersion).toBe((settings.body as ModelSettingsResponse).version);
    expect(body.confidenceRule).toMatch(/high when the 80 % range spans at most 20 %/);
    // Estimates from kin carry their kin strength and an 80 % likely range around the value.
    const fromKin = body.electives.filter((e) => e.bases.grade === 'neighbours');
    expect(fromKin.length).toBeGreaterThan(0);
    for (const e of fromKin) {
      expect(e.kinStrength.grade).toBeGreaterThan(0);
      const r = e.likelyRange.grade;
      expect(r, e.courseCode).not.toBeNull();
      expect(r!.low).toBeLessThanOrEqual(e.predictedGrade!);
      expect(r!.high).toBeGreaterThanOrEqual(e.predictedGrade!);
    }
    const offered = await withDatabase(async (db) => {
      const { rows } = await db.query<{ course_code: string }>(
        `SELECT o.course_code FROM offerings o JOIN courses c USING (course_code)
         WHERE o.term = $1 AND c.elective ORDER BY o.course_code`,
        [body.term],
      );
      return rows.map((r) => r.course_code);
    });
    expect(body.electives.map((e) => e.courseCode)).toEqual(offered);
    expect(body.electives.every((e) => e.offered)).toBe(true);
  });

  it('gives the reasons a student cannot take an elective, checked against the records', async () => {
    const body = await electives('?includeNotOffered=true');
    const passed = await passedInDatabase();
    const catalogue = await withDatabase(async (db) => {
      const { rows } = await db.query<{ course_code: string; prerequisites: string }>(
        `SELECT course_code, prerequisites FROM courses`,
      );
      return new Map(rows.map((r) => [r.course_code, r.prerequisites]));
    });
    const seen = new Set<string>();
    for (const e of body.electives) {
      const parsed = parsePrerequisites(catalogue.get(e.courseCode) ?? '');
      if (!parsed.ok) throw new Error(parsed.error);
      const expected: string[] = [];
      if (passed.has(e.courseCode)) expected.push('already_passed');
      if (unmetPrerequisites(parsed.expression, passed)) expected.push('prerequisite_not_passed');
      if (!e.offered) expected.push('not_offered');
      expect(
        e.ineligibleReasons.map((r) => r.code),
        e.courseCode,
      ).toEqual(expected);
      expect(e.eligible).toBe(expected.length === 0);
      for (const r of e.ineligibleReasons) {
        seen.add(r.code);
        expect(r.message).toMatch(
          /^(Already passed\.|Prerequisite not passed: .+\.|Not offered in \d{4}-\w\w\.)$/,
        );
      }
    }
    // The first active demo student has electives of all three kinds.
    expect([...seen].sort()).toEqual(['already_passed', 'not_offered', 'prerequisite_not_passed']);
  });

  it('gives estimates from kin with their counts, letters and fit on the scales', async () => {
    const [body, settings] = await Promise.all([electives(), get('/api/model/settings')]);
    const { k, minNeighbours } = (settings.body as ModelSettingsResponse).settings;
    const fromKin = body.electives.filter((e) => e.basis === 'neighbours');
    expect(fromKin.length).toBeGreaterThan(0);
    for (const e of body.electives) {
      for (const signal of ['grade', 'satisfaction'] as const) {
        const n = e.neighbours[signal];
        expect(Number.isInteger(n)).toBe(true);
        expect(n).toBeLessThanOrEqual(k);
        if (e.bases[signal] === 'neighbours') expect(n).toBeGreaterThanOrEqual(minNeighbours);
      }
      if (e.predictedGrade !== null) {
        expect(e.predictedGrade).toBeGreaterThanOrEqual(0);
        expect(e.predictedGrade).toBeLessThanOrEqual(4);
        expect(e.predictedGradeLetter).toMatch(/^[A-DF][+-]?$/);
      }
      if (e.predictedSatisfaction !== null) {
        expect(e.predictedSatisfaction).toBeGreaterThanOrEqual(1);
        expect(e.predictedSatisfaction).toBeLessThanOrEqual(5);
      }
      if (e.fit !== null) {
        expect(e.fit).toBeGreaterThanOrEqual(0);
        expect(e.fit).toBeLessThanOrEqual(100);
        expect(e.fitBasis).toBe('both');
      }
      expect(['low', 'medium', 'high']).toContain(e.confidence);
    }
  });

  it('gives the same numbers for the same request twice', async () => {
    const first = await electives();
    const second = await electives();
    expect(second).toEqual(first);
  });

  it("equals the engine's command line on the same records and settings", async () => {
    const [body, settingsRes, scale] = await Promise.all([
      electives(),
      get('/api/model/settings'),
      get('/api/grade-scale'),
    ]);
    const settings = (settingsRes.body as ModelSettingsResponse).settings;
    const dir = mkdtempSync(join(tmpdir(), 'kinpath-consistency-'));
    try {
      const file = join(dir, 'records.csv');
      await withDatabase(async (db) => {
        const { rows } = await db.query<{
          student_pseudonym: string;
          course_code: string;
          term: string;
          grade_points: string | null;
          satisfaction: number | null;
        }>(`SELECT student_pseudonym, course_code, term, grade_points, satisfaction FROM records`);
        const lines = rows.map(
          (r) =>
            `${r.student_pseudonym},${r.course_code},${termSortKey(r.term)},${r.grade_points ?? ''},${r.satisfaction ?? ''}`,
        );
        writeFileSync(file, `student,course,term,grade,satisfaction\n${lines.join('\n')}\n`);
      });
      const args = [
        CLI,
        'predict',
        '--records',
        file,
        '--student',
        pseudonym,
        '--signal',
        'grade',
        '--scale',
        `${scale.body.minPoints}:${scale.body.maxPoints}`,
        ...engineCliArgs(settings, 'grade'),
        ...body.electives.flatMap((e) => ['--course', e.courseCode]),
      ];
      const out = JSON.parse(execFileSync(process.execPath, args, { encoding: 'utf8' })) as {
        predictions: { course: string; value: number | null; neighbours: number; basis: string }[];
      };
      expect(out.predictions).toHaveLength(body.electives.length);
      body.electives.forEach((e: ElectiveEstimate, i) => {
        const cli = out.predictions[i];
        expect(cli.course).toBe(e.courseCode);
        expect(e.bases.grade, e.courseCode).toBe(cli.basis);
        expect(e.neighbours.grade, e.courseCode).toBe(cli.neighbours);
        if (cli.value === null) expect(e.predictedGrade).toBeNull();
        else expect(e.predictedGrade, e.courseCode).toBeCloseTo(cli.value, 10);
      });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('refuses a malformed term', async () => {
    const res = await get(`/api/students/${ref}/electives?term=2026-AU`);
    expect(res.status).toBe(400);
  });
});

describe('why an estimate', () => {
  it('gives kin count, similarity range, spread, outcomes, shared courses and the method', async () => {
    const body = await electives();
    const chosen = body.electives.find((e) => e.bases.grade === 'neighbours') as ElectiveEstimate;
    const res = await get(
      `/api/students/${ref}/electives/${encodeURIComponent(chosen.courseCode)}/explanation`,
    );
    expect(res.status).toBe(200);
    const why = res.body as ElectiveExplanation;
    expect(why.courseCode).toBe(chosen.courseCode);
    expect(why.method.name).toMatch(/collaborative filtering/);
    expect(why.grade.kinCount).toBe(chosen.neighbours.grade);
    expect(why.grade.value).toBeCloseTo(chosen.predictedGrade as number, 12);
    expect(why.grade.similarityRange?.min).toBeLessThanOrEqual(why.grade.similarityRange?.max ?? 0);
    expect(why.grade.spread).toBeGreaterThanOrEqual(0);
    expect(why.grade.outcomes?.reduce((sum, o) => sum + o.count, 0)).toBe(why.grade.kinCount);
    expect(why.grade.outcomesSuppressed).toBeNull();
    expect(why.grade.sharedCourses.length).toBeGreaterThan(0);
    for (const c of why.grade.sharedCourses) expect(c.title).not.toBe('');
    // Other students appear only as counts: no pseudonym leaves the server.
    expect(res.text).not.toMatch(HEX64);
  });

  it('answers 404 for a course not in the catalogue', async () => {
    expect((await get(`/api/students/${ref}/electives/ZZZ%209999/explanation`)).status).toBe(404);
  });
});

describe('with other settings (then put back)', () => {
  let before: ModelSettingsResponse;

  beforeAll(async () => {
    before = (await get('/api/model/settings')).body as ModelSettingsResponse;
  });

  afterAll(async () => {
    const now = (await get('/api/model/settings')).body.version;
    if (now !== before.version) {
      await api()
        .post(`/api/model/settings/versions/${before.version}/restore`)
        .set(...bearer(registrar));
    }
  });

  /** The settings in force before this block, with these changed. */
  async function use(settings: Record<string, unknown>): Promise<number> {
    const res = await api()
      .put('/api/model/settings')
      .set(...bearer(registrar))
      .send({ ...before.settings, ...settings });
    expect(res.status, res.text).toBe(200);
    return res.body.version as number;
  }

  it('hides the outcomes under 5 kin and says why', async () => {
    const version = await use({ k: 3, minNeighbours: 1 });
    const body = await electives();
    expect(body.settingsVersion).toBe(version);
    const chosen = body.electives.find((e) => e.neighbours.grade > 0) as ElectiveEstimate;
    expect(chosen.neighbours.grade).toBeLessThanOrEqual(3);
    expect(chosen.basis).toBe('neighbours');
    const res = await get(
      `/api/students/${ref}/electives/${encodeURIComponent(chosen.courseCode)}/explanation`,
    );
    expect(res.status).toBe(200);
    expect(res.body.grade.kinCount).toBe(chosen.neighbours.grade);
    expect(res.body.grade.outcomes).toBeNull();
    expect(res.body.grade.outcomesSuppressed).toMatch(/shown from 5 on/);
    expect(res.body.satisfaction.outcomes).toBeNull();
  });

  it('falls back to the baseline when too few kin contribute', async () => {
    // Hardly anyone is this similar, so most electives have fewer than 5 kin.
    await use({ minSimilarity: 0.999, minNeighbours: 5 });
    const body = await electives();
    const fallback = body.electives.filter((e) => e.bases.grade === 'baseline');
    expect(fallback.length).toBeGreaterThan(0);
    for (const e of body.electives) {
      expect(e.bases.grade).toBe(e.neighbours.grade >= 5 ? 'neighbours' : 'baseline');
    }
    for (const e of fallback) {
      expect(e.basis).toBe('baseline');
      expect(e.confidence).toBe('low');
      expect(e.predictedGrade).not.toBeNull();
    }
  });
});

describe('notes and the shortlist', () => {
  let second: string;
  let secondEmail: string;

  beforeAll(async () => {
    const admin = await signIn(DEMO_USERS.admin);
    secondEmail = uniqueEmail('advisor.two');
    const created = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: secondEmail,
        displayName: 'Second Halden advisor',
        role: 'advisor',
        password: 'second-advisor-password-2026',
      });
    expect(created.status, created.text).toBe(201);
    second = await signIn(secondEmail, 'second-advisor-password-2026');
  });

  it('keeps dated notes with their author, visible to other advisors', async () => {
    const text = `Talked through next term's options ${Date.now()}.`;
    const posted = await api()
      .post(`/api/students/${ref}/notes`)
      .set(...bearer(advisor))
      .send({ text: `  ${text}  ` });
    expect(posted.status, posted.text).toBe(201);
    expect(posted.body).toMatchObject({ text, authorEmail: DEMO_USERS.advisor });
    expect(Date.parse(posted.body.createdAt)).toBeGreaterThan(Date.now() - 60_000);
    const seen = await get(`/api/students/${ref}/notes`, second);
    expect(seen.status).toBe(200);
    expect(seen.body[0]).toMatchObject({
      id: posted.body.id,
      text,
      authorEmail: DEMO_USERS.advisor,
    });
  });

  it('refuses a note holding a student number, and stores nothing of it', async () => {
    const other = activeDemoStudents(2)[1];
    const before = (await get(`/api/students/${ref}/notes`, advisor)).body.length as number;
    for (const text of [`Spoke with ${studentId} today.`, `Compare with ${other.toLowerCase()}.`]) {
      const res = await api()
        .post(`/api/students/${ref}/notes`)
        .set(...bearer(advisor))
        .send({ text });
      expect(res.status, res.text).toBe(400);
      expect(res.body.message).toMatch(/contains a student number/);
      expect(res.text).not.toContain(studentId);
      expect(res.text.toLowerCase()).not.toContain(other.toLowerCase());
    }
    expect((await get(`/api/students/${ref}/notes`, advisor)).body).toHaveLength(before);
    // Years and course numbers have the same form but are nobody's number.
    const fine = await api()
      .post(`/api/students/${ref}/notes`)
      .set(...bearer(advisor))
      .send({ text: 'Plans CMP 2310 for 2026 and CMP3110 after that.' });
    expect(fine.status, fine.text).toBe(201);
  });

  it('refuses an empty note, one over 4000 characters, and registrar staff', async () => {
    for (const text of ['   ', 'x'.repeat(4001)]) {
      const res = await api()
        .post(`/api/students/${ref}/notes`)
        .set(...bearer(advisor))
        .send({ text });
      expect(res.status).toBe(400);
      expect(res.body.message[0]).toMatch(/1 to 4000 characters/);
    }
    const ok = await api()
      .post(`/api/students/${ref}/notes`)
      .set(...bearer(advisor))
      .send({ text: 'y'.repeat(4000) });
    expect(ok.status).toBe(201);
    expect((await get(`/api/students/${ref}/notes`, registrar)).status).toBe(403);
  });

  it('keeps the shortlist with who added each course and who changed it last', async () => {
    const body = await electives();
    const [a, b, c] = body.electives.map((e) => e.courseCode);
    const first = await api()
      .put(`/api/students/${ref}/shortlist`)
      .set(...bearer(advisor))
      .send({ courseCodes: [a, b.replace(' ', '').toLowerCase()] });
    expect(first.status, first.text).toBe(200);
    expect((first.body as Shortlist).courseCodes.sort()).toEqual([a, b].sort());

    const changed = await api()
      .put(`/api/students/${ref}/shortlist`)
      .set(...bearer(second))
      .send({ courseCodes: [a, c] });
    expect(changed.status).toBe(200);
    const list = changed.body as Shortlist;
    expect(list.courseCodes.sort()).toEqual([a, c].sort());
    expect(list.items.find((i) => i.courseCode === a)?.addedByEmail).toBe(DEMO_USERS.advisor);
    expect(list.items.find((i) => i.courseCode === c)?.addedByEmail).toBe(secondEmail);
    expect(list.updatedByEmail).toBe(secondEmail);

    const seen = await get(`/api/students/${ref}/shortlist`);
    expect(seen.body).toEqual(list);
  });

  it('refuses a course not in the catalogue and registrar staff', async () => {
    const res = await api()
      .put(`/api/students/${ref}/shortlist`)
      .set(...bearer(advisor))
      .send({ courseCodes: ['ZZZ 9999'] });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/not a course of the catalogue/);
    expect((await get(`/api/students/${ref}/shortlist`, registrar)).status).toBe(403);
  });
});

describe('the summary e-mail', () => {
  it('sends the estimates with kin counts and the cautions, and no student number', async () => {
    const body = await electives();
    const chosen = body.electives.filter((e) => e.basis === 'neighbours').slice(0, 2);
    const to = uniqueEmail('student');
    const res = await api()
      .post(`/api/students/${ref}/summary`)
      .set(...bearer(advisor))
      .send({
        to,
        courseCodes: chosen.map((e) => e.courseCode),
        message: 'Good to talk today; here is what we looked at.',
      });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({
      to,
      term: body.term,
      courseCodes: chosen.map((e) => e.courseCode),
    });
    const mail = await caughtMailTo(to);
    expect(mail.subject).toBe(`Your elective shortlist for ${body.term}`);
    expect(mail.text).toContain('Good to talk today');
    for (const e of chosen) {
      expect(mail.text).toContain(`${e.courseCode} ${e.title}`);
      expect(mail.text).toContain(`based on ${e.neighbours.grade} similar past students`);
      expect(mail.text).toContain(`Fit: ${Math.round(e.fit as number)} out of 100`);
    }
    for (const caution of ESTIMATE_CAUTIONS) {
      expect(mail.text).toContain(caution);
    }
    for (const part of [mail.text, mail.html, mail.subject]) {
      expect(part).not.toContain(studentId);
      expect(part).not.toContain(pseudonym);
      expect(part).not.toContain(ref);
    }
  });

  it('refuses a bad address, an unknown course, and a message carrying a student number', async () => {
    const send = (payload: Record<string, unknown>) =>
      api()
        .post(`/api/students/${ref}/summary`)
        .set(...bearer(advisor))
        .send({ to: 'student@halden.example', courseCodes: ['CMP 1110'], ...payload });
    const bad = await send({ to: 'not an address' });
    expect(bad.status).toBe(400);
    expect(bad.body.message).toContain('to must be a valid e-mail address.');
    expect((await send({ courseCodes: ['ZZZ 9999'] })).status).toBe(400);
    const leaking = await send({ message: `About ${studentId}: see the list.` });
    expect(leaking.status).toBe(400);
    expect(leaking.body.message).toMatch(/student number/);
    expect(leaking.text).not.toContain(studentId);
    const registrarTry = await api()
      .post(`/api/students/${ref}/summary`)
      .set(...bearer(registrar))
      .send({ to: 'student@halden.example', courseCodes: ['CMP 1110'] });
    expect(registrarTry.status).toBe(403);
  });
});

describe('the audit trail', () => {
  it('has a row per lookup, electives view, note, shortlist change and e-mail, by ref', async () => {
    const rows = await withDatabase(async (db) => {
      const { rows } = await db.query<{ action: string; actor_email: string }>(
        `SELECT action, actor_email FROM audit_events WHERE target = $1`,
        [ref],
      );
      return rows;
    });
    const actions = new Set(rows.map((r) => r.action));
    for (const action of [
      'student.lookup',
      'student.electives_viewed',
      'student.note_added',
      'student.shortlist_changed',
      'student.summary_sent',
    ]) {
      expect(actions.has(action), action).toBe(true);
    }
    expect(rows.find((r) => r.action === 'student.lookup')?.actor_email).toBe(DEMO_USERS.advisor);
  });

  it('never holds the student number or the pseudonym', async () => {
    const leaks = await withDatabase(async (db) => {
      const { rows } = await db.query<{ n: number }>(
        `SELECT count(*)::int AS n FROM audit_events
         WHERE coalesce(target, '') ILIKE '%' || $1 || '%' OR detail::text ILIKE '%' || $1 || '%'
            OR coalesce(target, '') LIKE '%' || $2 || '%' OR detail::text LIKE '%' || $2 || '%'`,
        [studentId, pseudonym],
      );
      return rows[0].n;
    });
    expect(leaks).toBe(0);
  });
});
