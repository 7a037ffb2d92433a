import { termOrdinal } from '@kinpath/contracts';
import { outlook as engine } from '@kinpath/engine';
import type { ClientBase } from 'pg';
import { to as copyTo } from 'pg-copy-streams';
import { loadGradeScale, type GradeScaleModel } from '../grade-scale/grade-scale.model';
import { parsePrerequisites, type PrerequisiteNode } from '../imports/validation/prerequisites';
import type { CatalogueEntry } from '../model/model-snapshot';
import { passes, passRule, type PassRule } from '../students/attempts';

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
 * Everything an outlook run reads, from one consistent snapshot of the database. Records are
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
  /** Course level digit (4 for a 4000-level course), from the catalogue's level or the code. */
  levels: Map<string, number>;
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
      level: string | null;
    }>(
      `SELECT course_code, title, department, credits, elective, prerequisites, level FROM courses`,
    );
    const levels = new Map<string, number>();
    for (const row of courseRows.rows) {
      levels.set(row.course_code, courseLevel(row.course_code, row.level));
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
      levels,
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

/** 4 for "4000" or, without a level, for a code like CMP 4110; 0 when neither says. */
export function courseLevel(code: string, level: string | null): number {
  const digit = (level ? /^\s*(\d)/.exec(level) : null) ?? /(\d)/.exec(code);
  return digit ? Number(digit[1]) : 0;
}

/** The cohort as the engine's outlook input, with the codes behind its numbers. */
export interface OutlookInput {
  data: engine.OutlookData;
  courses: string[];
  /** Students in the cohort order: pseudonyms of the students table, then any only in records. */
  pseudonyms: string[];
  /** Active students (the live forecast's population). */
  active: Int32Array;
}

function prerequisite(
  node: PrerequisiteNode | null,
  index: Map<string, number>,
): engine.Prerequisite | null {
  if (!node) return null;
  if (node.type === 'course') {
    // A prerequisite outside the catalogue cannot have been passed.
    return { course: index.get(node.code) ?? -1 };
  }
  const items = node.items.map((n) => prerequisite(n, index) as engine.Prerequisite);
  return node.type === 'and' ? { all: items } : { any: items };
}

export function toOutlookInput(cohort: CohortData): OutlookInput {
  // Records of a course missing from the catalogue still count as records of a course.
  const courses = [...new Set([...cohort.courses.keys(), ...cohort.course])].sort();
  const courseIndex = new Map(courses.map((c, i) => [c, i]));
  const pseudonyms = [...cohort.students.keys()].sort();
  const studentIndex = new Map(pseudonyms.map((p, i) => [p, i]));
  for (const p of cohort.pseudonyms) {
    if (!studentIndex.has(p)) studentIndex.set(p, pseudonyms.push(p) - 1);
  }
  const programmes = new Map<string, number>();
  for (const s of cohort.students.values()) {
    if (s.program && !programmes.has(s.program)) programmes.set(s.program, programmes.size);
  }
  const unknown = programmes.size;
  const S = pseudonyms.length;
  const studentProgramme = new Int32Array(S).fill(unknown);
  const studentEntry = new Int32Array(S).fill(engine.NO_TERM);
  const active: number[] = [];
  pseudonyms.forEach((p, i) => {
    const s = cohort.students.get(p);
    if (!s) return;
    if (s.program) studentProgramme[i] = programmes.get(s.program) as number;
    if (s.entryTerm) studentEntry[i] = termOrdinal(s.entryTerm);
    if (s.status === 'active') active.push(i);
  });
  // Records per student in term order (the cohort has them by student only).
  const counts = new Int32Array(S + 1);
  const position = new Int32Array(cohort.pseudonyms.length);
  cohort.pseudonyms.forEach((p, k) => {
    const s = studentIndex.get(p) as number;
    position[k] = s;
    counts[s + 1] = cohort.from[k + 1] - cohort.from[k];
  });
  const recordFrom = new Int32Array(S + 1);
  for (let s = 0; s < S; s++) recordFrom[s + 1] = recordFrom[s] + counts[s + 1];
  const R = recordFrom[S];
  const recordCourse = new Int32Array(R);
  const recordTerm = new Int32Array(R);
  const recordPassed = new Uint8Array(R);
  cohort.pseudonyms.forEach((_, k) => {
    const order: number[] = [];
    for (let r = cohort.from[k]; r < cohort.from[k + 1]; r++) order.push(r);
    order.sort((a, b) => cohort.ordinal[a] - cohort.ordinal[b]);
    let at = recordFrom[position[k]];
    for (const r of order) {
      const points = cohort.points[r];
      recordCourse[at] = courseIndex.get(cohort.course[r]) ?? -1;
      recordTerm[at] = cohort.ordinal[r];
      recordPassed[at] = passes(
        {
          term: cohort.term[r],
          courseCode: cohort.course[r],
          grade: cohort.grade[r],
          gradePoints: points === points ? points : null,
          satisfaction: null,
          creditsAttempted: null,
        },
        cohort.rule,
      )
        ? 1
        : 0;
      at++;
    }
  });
  const offerings = new Map<number, Int32Array>();
  for (const [term, offered] of cohort.offerings) {
    const electives = [...offered.keys()]
      .filter((c) => cohort.courses.get(c)?.elective)
      .map((c) => courseIndex.get(c) as number);
    offerings.set(termOrdinal(term), Int32Array.from(electives));
  }
  return {
    data: {
      termsPerYear: 4,
      courseCount: courses.length,
      courseLevel: Int32Array.from(courses, (c) => cohort.levels.get(c) ?? 0),
      courseElective: Uint8Array.from(courses, (c) => (cohort.courses.get(c)?.elective ? 1 : 0)),
      prerequisites: courses.map((c) =>
        prerequisite(cohort.courses.get(c)?.prerequisites ?? null, courseIndex),
      ),
      programmeCount: unknown + 1,
      studentProgramme,
      studentEntry,
      recordFrom,
      recordCourse,
      recordTerm,
      recordPassed,
      offerings,
    },
    courses,
    pseudonyms,
    active: Int32Array.from(active),
  };
}
