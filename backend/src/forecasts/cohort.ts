import { termOrdinal } from '@kinpath/contracts';
import { buildModel, expectedLoad, type Model, type Scale } from '@kinpath/engine';
import type { ClientBase } from 'pg';
import { to as copyTo } from 'pg-copy-streams';
import { loadGradeScale, type GradeScaleModel } from '../grade-scale/grade-scale.model';
import { parsePrerequisites } from '../imports/validation/prerequisites';
import type { CatalogueEntry } from '../model/model-snapshot';
import { termSortKey } from '../model/term-keys';
import { passes, passRule, type PassRule } from '../students/attempts';
import { ineligibleReasons } from '../students/eligibility';
import { yearOfStudy } from './forecast-rules';

export type ScoringPart = 'forecast' | 'backtest' | 'calibration';

export interface Offering {
  capacity: number;
  sections: number | null;
}

interface StudentRow {
  program: string | null;
  entryTerm: string | null;
  status: string;
}

/**
 * Everything a scoring run reads, from one consistent snapshot of the database. Records are
 * grouped by student (`from[s]..from[s+1]` index the record columns of student s).
 */
export interface CohortData {
  /** Identifies the term data this was read from (see DATA_STAMP_SQL). */
  stamp: string;
  scale: GradeScaleModel;
  rule: PassRule;
  courses: Map<string, CatalogueEntry>;
  offerings: Map<string, Map<string, Offering>>;
  students: Map<string, StudentRow>;
  pseudonyms: string[];
  from: Int32Array;
  course: string[];
  term: string[];
  ordinal: Int32Array;
  grade: string[];
  points: Float64Array;
  satisfaction: Float64Array;
  models: Map<number, Model>;
}

/**
 * Changes whenever committed term data or the grade scale changes: every commit and rollback
 * leaves its import row in a final status, and both are read in the same snapshot as the data.
 */
export const DATA_STAMP_SQL = `
  SELECT md5(
    coalesce((SELECT string_agg(id::text || ':' || status, ',' ORDER BY id) FROM imports
              WHERE status IN ('committed', 'rolled_back')), '') || '|' ||
    coalesce((SELECT string_agg(letter || ':' || coalesce(points::text, '') || ':' || passing::text,
              ',' ORDER BY letter) FROM grade_scale), '')) AS stamp`;

const NULL = '\\N';

/** Reads the cohort in one REPEATABLE READ transaction (an import may be committing meanwhile). */
export async function loadCohort(client: ClientBase): Promise<CohortData> {
  await client.query('BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY');
  try {
    const stamp = (await client.query<{ stamp: string }>(DATA_STAMP_SQL)).rows[0].stamp;
    const scale = await loadGradeScale(async (sql) => (await client.query(sql)).rows);
    const courses = new Map<string, CatalogueEntry>();
    const courseRows = await client.query<{
      course_code: string;
      title: string;
      department: string;
      credits: string | null;
      elective: boolean;
      prerequisites: string | null;
    }>(`SELECT course_code, title, department, credits, elective, prerequisites FROM courses`);
    for (const row of courseRows.rows) {
      const parsed = parsePrerequisites(row.prerequisites ?? '');
      courses.set(row.course_code, {
        courseCode: row.course_code,
        title: row.title,
        department: row.department,
        credits: row.credits === null ? null : Number(row.credits),
        elective: row.elective,
        prerequisites: parsed.ok ? parsed.expression : null,
      });
    }
    const offerings = new Map<string, Map<string, Offering>>();
    const offeringRows = await client.query<{
      term: string;
      course_code: string;
      capacity: number;
      sections: number | null;
    }>(`SELECT term, course_code, capacity, sections FROM offerings`);
    for (const row of offeringRows.rows) {
      let m = offerings.get(row.term);
      if (!m) offerings.set(row.term, (m = new Map()));
      m.set(row.course_code, { capacity: Number(row.capacity), sections: row.sections });
    }
    const students = new Map<string, StudentRow>();
    const studentRows = await client.query<{
      pseudonym: string;
      program: string | null;
      entry_term: string | null;
      status: string;
    }>(`SELECT pseudonym, program, entry_term, status FROM students`);
    for (const row of studentRows.rows) {
      students.set(row.pseudonym, {
        program: row.program,
        entryTerm: row.entry_term,
        status: row.status,
      });
    }
    const data = await readRecords(client);
    return {
      stamp,
      scale,
      rule: passRule(scale),
      courses,
      offerings,
      students,
      ...data,
      models: new Map(),
    };
  } finally {
    await client.query('COMMIT');
  }
}

async function readRecords(client: ClientBase) {
  const pseudonyms: string[] = [];
  const from: number[] = [];
  const course: string[] = [];
  const term: string[] = [];
  const ordinal: number[] = [];
  const grade: string[] = [];
  const points: number[] = [];
  const satisfaction: number[] = [];
  const shared = new Map<string, string>();
  const one = (s: string) => {
    let v = shared.get(s);
    if (v === undefined) shared.set(s, (v = s));
    return v;
  };
  const ordinals = new Map<string, number>();
  const take = (line: string) => {
    if (line === '') return;
    const [student, c, t, g, p, s] = line.split('\t');
    if (pseudonyms[pseudonyms.length - 1] !== student) {
      pseudonyms.push(student);
      from.push(course.length);
    }
    course.push(one(c));
    term.push(one(t));
    let o = ordinals.get(t);
    if (o === undefined) ordinals.set(t, (o = termOrdinal(t)));
    ordinal.push(o);
    grade.push(one(g));
    points.push(p === NULL ? NaN : Number(p));
    satisfaction.push(s === NULL ? NaN : Number(s));
  };
  const stream = client.query(
    copyTo(
      `COPY (SELECT student_pseudonym, course_code, term, grade, grade_points, satisfaction
             FROM records ORDER BY student_pseudonym) TO STDOUT`,
    ),
  );
  let rest = '';
  for await (const chunk of stream as AsyncIterable<Buffer>) {
    const lines = (rest + chunk.toString('utf8')).split('\n');
    rest = lines.pop() ?? '';
    for (const line of lines) take(line);
  }
  take(rest);
  from.push(course.length);
  return {
    pseudonyms,
    from: Int32Array.from(from),
    course,
    term,
    ordinal: Int32Array.from(ordinal),
    grade,
    points: Float64Array.from(points),
    satisfaction: Float64Array.from(satisfaction),
  };
}

/** The latest of `terms` before `term`; null when there is none. */
function latestBefore(terms: readonly string[], term: string): string | null {
  const o = termOrdinal(term);
  let found: string | null = null;
  for (const t of terms) {
    if (termOrdinal(t) < o && (found === null || termOrdinal(t) > termOrdinal(found))) found = t;
  }
  return found;
}

/** What planning a run needs: its data stamp, past terms and the head count of each part. */
export interface RunOutline {
  stamp: string;
  backtest: string | null;
  calibration: string | null;
  students: Partial<Record<ScoringPart, number>>;
}

/**
 * A run's outline counted in SQL, in one snapshot as loadCohort reads: planning then takes
 * seconds instead of a cohort read, and every worker process reads the cohort at the same time,
 * each for its first chunk. The head counts are planPart's populations (a chunk checks that its
 * cohort agrees).
 */
export async function outlineRun(
  client: ClientBase,
  term: string,
  parts: readonly string[],
): Promise<RunOutline> {
  await client.query('BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY');
  try {
    const count = async (sql: string, params: unknown[] = []) =>
      Number((await client.query<{ n: string }>(sql, params)).rows[0].n);
    const stamp = (await client.query<{ stamp: string }>(DATA_STAMP_SQL)).rows[0].stamp;
    const terms = (await client.query<{ term: string }>(`SELECT DISTINCT term FROM records`)).rows;
    const recordTerms = terms.map((r) => r.term);
    const backtest = parts.includes('backtest') ? latestBefore(recordTerms, term) : null;
    const calibration =
      backtest && parts.includes('calibration') ? latestBefore(recordTerms, backtest) : null;
    const students: RunOutline['students'] = {
      forecast: await count(`SELECT count(*) AS n FROM students WHERE status = 'active'`),
    };
    // Past terms: the students who enrolled in anything that term.
    const enrolled = `SELECT count(DISTINCT student_pseudonym) AS n FROM records WHERE term = $1`;
    if (backtest) students.backtest = await count(enrolled, [backtest]);
    if (calibration) students.calibration = await count(enrolled, [calibration]);
    return { stamp, backtest, calibration, students };
  } finally {
    await client.query('COMMIT');
  }
}

/**
 * The engine model from the records before `term` only: what was known when students chose
 * their electives for it. Built once per term and kept with the data.
 */
export function modelBefore(data: CohortData, term: string): Model {
  const cut = termOrdinal(term);
  const cached = data.models.get(cut);
  if (cached) return cached;
  // Sized first: millions of records, and growing arrays by push costs more than the build.
  let n = 0;
  for (let r = 0; r < data.ordinal.length; r++) if (data.ordinal[r] < cut) n++;
  const students = new Array<string>(n);
  const courses = new Array<string>(n);
  const terms = new Array<string>(n);
  const grades = new Float64Array(n);
  const satisfaction = new Float64Array(n);
  const { minPoints, maxPoints } = data.scale;
  const keys = new Map<string, string>();
  let i = 0;
  for (let s = 0; s < data.pseudonyms.length; s++) {
    for (let r = data.from[s]; r < data.from[s + 1]; r++) {
      if (data.ordinal[r] >= cut) continue;
      let key = keys.get(data.term[r]);
      if (key === undefined) keys.set(data.term[r], (key = termSortKey(data.term[r])));
      let g = data.points[r];
      // Points outside an edited scale are left out, as the advising model does.
      if (g === g && (g < minPoints || g > maxPoints)) g = NaN;
      students[i] = data.pseudonyms[s];
      courses[i] = data.course[r];
      terms[i] = key;
      grades[i] = g;
      satisfaction[i] = data.satisfaction[r];
      i++;
    }
  }
  const scales: { grade?: Scale; satisfaction: Scale } = { satisfaction: { min: 1, max: 5 } };
  if (maxPoints > minPoints) scales.grade = { min: minPoints, max: maxPoints };
  const model = buildModel({ students, courses, terms, grades, satisfaction }, { scales });
  data.models.set(cut, model);
  return model;
}

/** One part of a run: a term, its population in a fixed order, loads and offered electives. */
export interface PartPlan {
  part: ScoringPart;
  term: string;
  /** Pseudonyms in string order, so every worker process numbers them alike. */
  students: string[];
  loads: Float64Array;
  /** Offered electives of the term, in code order. */
  electives: string[];
}

/**
 * The population of a part. Forecast: every active student. Backtest and calibration (past
 * terms): the students who enrolled in anything that term, since their status then is unknown.
 */
export function planPart(data: CohortData, part: ScoringPart, term: string): PartPlan {
  let students: string[];
  if (part === 'forecast') {
    students = [...data.students.entries()]
      .filter(([, s]) => s.status === 'active')
      .map(([p]) => p);
  } else {
    const o = termOrdinal(term);
    students = [];
    for (let s = 0; s < data.pseudonyms.length; s++) {
      for (let r = data.from[s]; r < data.from[s + 1]; r++) {
        if (data.ordinal[r] === o) {
          students.push(data.pseudonyms[s]);
          break;
        }
      }
    }
  }
  students.sort();
  const offered = data.offerings.get(term) ?? new Map<string, Offering>();
  const electives = [...offered.keys()].filter((c) => data.courses.get(c)?.elective).sort();
  const loadOf = loadsBefore(data, term);
  const loads = Float64Array.from(students, (p) => {
    const s = data.students.get(p);
    const year = yearOfStudy(s?.entryTerm ?? null, term);
    if (!s?.program || year === null) return 1;
    return loadOf(s.program, year);
  });
  return { part, term, students, loads, electives };
}

/**
 * e_s of method.md: the median number of electives per term that students of the same
 * programme and year of study took before `term` (every term they had records in); else 1.
 */
export function loadsBefore(
  data: CohortData,
  term: string,
): (program: string, year: number) => number {
  const cut = termOrdinal(term);
  const counts = new Map<string, number[]>();
  for (let s = 0; s < data.pseudonyms.length; s++) {
    const info = data.students.get(data.pseudonyms[s]);
    if (!info?.program) continue;
    const perTerm = new Map<string, number>();
    for (let r = data.from[s]; r < data.from[s + 1]; r++) {
      if (data.ordinal[r] >= cut) continue;
      const elective = data.courses.get(data.course[r])?.elective ? 1 : 0;
      perTerm.set(data.term[r], (perTerm.get(data.term[r]) ?? 0) + elective);
    }
    for (const [t, n] of perTerm) {
      const year = yearOfStudy(info.entryTerm, t);
      if (year === null) continue;
      const key = `${info.program}\u0000${year}`;
      let list = counts.get(key);
      if (!list) counts.set(key, (list = []));
      list.push(n);
    }
  }
  const medians = new Map<string, number>();
  for (const [key, list] of counts) medians.set(key, expectedLoad(list));
  return (program, year) => medians.get(`${program}\u0000${year}`) ?? 1;
}

/** Index of each pseudonym in the record columns. */
export function studentIndex(data: CohortData): Map<string, number> {
  const index = new Map<string, number>();
  data.pseudonyms.forEach((p, i) => index.set(p, i));
  return index;
}

/** Courses the student passed before `term` (data.md: P, or a grade at or above the threshold). */
export function passedBefore(
  data: CohortData,
  position: number | undefined,
  term: string,
): Set<string> {
  const passed = new Set<string>();
  if (position === undefined) return passed;
  const cut = termOrdinal(term);
  for (let r = data.from[position]; r < data.from[position + 1]; r++) {
    if (data.ordinal[r] >= cut) continue;
    const points = data.points[r];
    const attempt = {
      term: data.term[r],
      courseCode: data.course[r],
      grade: data.grade[r],
      gradePoints: points === points ? points : null,
      satisfaction: null,
      creditsAttempted: null,
    };
    if (passes(attempt, data.rule)) passed.add(data.course[r]);
  }
  return passed;
}

/** Eligible: not yet passed and prerequisites passed (the advising rules, offered in the term). */
export function isEligible(
  data: CohortData,
  courseCode: string,
  passed: ReadonlySet<string>,
  term: string,
): boolean {
  const course = data.courses.get(courseCode);
  return !!course && ineligibleReasons(course, passed, true, term).length === 0;
}

/** The student's eligible offered electives of the part, as positions in `plan.electives`. */
export function eligibleElectives(
  data: CohortData,
  position: number | undefined,
  plan: PartPlan,
): number[] {
  const passed = passedBefore(data, position, plan.term);
  const eligible: number[] = [];
  for (let t = 0; t < plan.electives.length; t++) {
    if (isEligible(data, plan.electives[t], passed, plan.term)) eligible.push(t);
  }
  return eligible;
}

/** Students enrolled per elective in `term` (records in that term, any mark). */
export function enrolments(data: CohortData, term: string): Map<string, number> {
  const o = termOrdinal(term);
  const out = new Map<string, number>();
  for (let r = 0; r < data.course.length; r++) {
    if (data.ordinal[r] === o) out.set(data.course[r], (out.get(data.course[r]) ?? 0) + 1);
  }
  return out;
}

/** The naive forecast: each course's enrolment the last time it ran before `term`. */
export function naiveForecast(
  data: CohortData,
  term: string,
): Map<string, { count: number; term: string }> {
  const cut = termOrdinal(term);
  const last = new Map<string, { ordinal: number; count: number; term: string }>();
  for (let r = 0; r < data.course.length; r++) {
    const o = data.ordinal[r];
    if (o >= cut) continue;
    const seen = last.get(data.course[r]);
    if (!seen || o > seen.ordinal)
      last.set(data.course[r], { ordinal: o, count: 1, term: data.term[r] });
    else if (o === seen.ordinal) seen.count++;
  }
  return new Map([...last].map(([c, v]) => [c, { count: v.count, term: v.term }]));
}
