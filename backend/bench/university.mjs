// The engine benchmark's invented university (generateUniversity, fixed seed) as the
// registrar's tables hold it: catalogue, next-term offerings, pseudonymised students and
// their records, written straight into a migrated database with COPY. Shared by the
// benchmarks that need a large institution in PostgreSQL.
//
// Uses the built backend (npm run build) for the schema.
import { createRequire } from 'node:module';
import { join, resolve } from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';

const require = createRequire(import.meta.url);
const dist = resolve(import.meta.dirname, '..', 'dist');
const { from: copyFrom } = require('pg-copy-streams');
require('reflect-metadata');
const { DataSource } = require('typeorm');
const engine = require('@kinpath/engine');
const { dataSourceOptions } = require(join(dist, 'database', 'options.js'));

const LETTERS = [
  ['F', 0], ['D-', 0.7], ['D', 1], ['D+', 1.3], ['C-', 1.7], ['C', 2], ['C+', 2.3], ['B-', 2.7],
  ['B', 3], ['B+', 3.3], ['A-', 3.7], ['A', 4],
]; // prettier-ignore
const letterOf = new Map(LETTERS.map(([l, p]) => [p, l]));

/** Course keys as the catalogue accepts them (the generator may add an X to a repeated key). */
function courseCodes(keys) {
  const valid = /^[A-Z]{2,6} [0-9]{3,5}$/;
  let extra = 0;
  return new Map(keys.map((k) => [k, valid.test(k) ? k : `XTR ${10000 + extra++}`]));
}

async function copyRows(client, sql, rows) {
  await pipeline(Readable.from(rows), client.query(copyFrom(sql)));
}

function* lines(count, line, batch = 8192) {
  let buffer = '';
  for (let i = 0; i < count; i++) {
    const l = line(i);
    if (l) buffer += l;
    if ((i + 1) % batch === 0) {
      yield buffer;
      buffer = '';
    }
  }
  if (buffer) yield buffer;
}

/** Runs the server's migrations on an empty database (`dbConfig` as the server reads it). */
export async function migrate(dbConfig) {
  const dataSource = new DataSource({ ...dataSourceOptions(dbConfig), logging: false });
  await dataSource.initialize();
  await dataSource.runMigrations();
  await dataSource.destroy();
}

/** The numbers of the `count` active students: every fifth student, from the first. */
export function activeStudents(uni, count) {
  const n = uni.studentKeys.length;
  return Array.from({ length: Math.min(count, n) }, (_, i) => uni.studentKeys[(i * 5) % n]);
}

/**
 * Writes `uni` (from engine.generateUniversity) through `client`, a pg client connected to a
 * migrated, empty database. `active` students (see activeStudents) are active, the rest
 * graduated; `offered` ('all' or a count) electives are offered in the term after the
 * last one with records; `pseudonym(studentNumber)` gives each student's pseudonym. With
 * `pastOfferings`, every elective with a record in a past term is offered in that term too
 * (what the outlook's backtests need).
 * Answers that term, the offered course codes and the active students' numbers.
 */
export async function loadUniversity(
  client,
  uni,
  { active, offered = 'all', pseudonym, pastOfferings = false },
) {
  const codes = courseCodes(uni.courseKeys);
  const electives = uni.electives.map((k) => codes.get(k));
  const offeredCodes = offered === 'all' ? electives : electives.slice(0, Number(offered));
  const lastTerm = uni.termKeys[uni.termKeys.length - 1];
  const term = `${Number(lastTerm.slice(0, 4)) + 1}-SP`;
  const activeKeys = activeStudents(uni, active);
  const activeSet = new Set(activeKeys);

  const electiveSet = new Set(uni.electives);
  await copyRows(
    client,
    `COPY courses (course_code, title, department, credits, elective) FROM STDIN`,
    lines(uni.courseKeys.length, (i) => {
      const code = codes.get(uni.courseKeys[i]);
      return `${code}\tCourse ${code}\t${code.split(' ')[0]}\t3\t${electiveSet.has(uni.courseKeys[i])}\n`;
    }),
  );
  await copyRows(
    client,
    `COPY offerings (term, course_code, sections, capacity) FROM STDIN`,
    lines(offeredCodes.length, (i) => `${term}\t${offeredCodes[i]}\t2\t100\n`),
  );
  if (pastOfferings) {
    const past = new Set();
    for (let r = 0; r < uni.courses.length; r++) {
      if (electiveSet.has(uni.courses[r]))
        past.add(`${uni.terms[r]}\t${codes.get(uni.courses[r])}`);
    }
    const rows = [...past];
    await copyRows(
      client,
      `COPY offerings (term, course_code, sections, capacity) FROM STDIN`,
      lines(rows.length, (i) => `${rows[i]}\t2\t100\n`),
    );
  }
  // Entry term: each student's first term with a record.
  const first = new Map();
  for (let r = 0; r < uni.students.length; r++) {
    const s = uni.students[r];
    const t = uni.terms[r];
    const seen = first.get(s);
    if (!seen || engine.registrarTermOrder(t, seen) < 0) first.set(s, t);
  }
  const pseudonyms = new Map(uni.studentKeys.map((k) => [k, pseudonym(k)]));
  await copyRows(
    client,
    `COPY students (pseudonym, program, entry_term, status) FROM STDIN`,
    lines(uni.studentKeys.length, (i) => {
      const k = uni.studentKeys[i];
      return `${pseudonyms.get(k)}\tP${uni.programmeOf[i]}\t${first.get(k) ?? lastTerm}\t${activeSet.has(k) ? 'active' : 'graduated'}\n`;
    }),
  );
  // One record per student, term and course (the table's key); the generator may repeat one.
  const seen = new Set();
  await copyRows(
    client,
    `COPY records (student_pseudonym, term, course_code, grade, grade_points, satisfaction) FROM STDIN`,
    lines(uni.students.length, (r) => {
      const key = `${uni.students[r]}|${uni.terms[r]}|${uni.courses[r]}`;
      if (seen.has(key)) return '';
      seen.add(key);
      if (seen.size > 2_000_000) seen.clear(); // Records come grouped by student.
      const g = uni.grades[r];
      const grade = g === g ? (letterOf.get(g) ?? 'C') : 'W';
      const points = g === g ? String(g) : '\\N';
      const sat = uni.satisfaction[r];
      return `${pseudonyms.get(uni.students[r])}\t${uni.terms[r]}\t${codes.get(uni.courses[r])}\t${grade}\t${points}\t${sat === sat ? sat : '\\N'}\n`;
    }),
  );
  await client.query('ANALYZE');
  return { term, offered: offeredCodes, active: activeKeys };
}
