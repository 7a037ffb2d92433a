import {
  type GradeScaleEntry,
  isTerm,
  normalizeCourseCode,
  readGrade,
  STUDENT_STATUSES,
  type StudentStatus,
} from '@kinpath/contracts';
import { parse } from 'csv-parse/sync';

/**
 * Reading the demo's four CSV files (data.md's default columns) into rows ready
 * to insert. Student numbers go through `pseudonymise` at once and are not kept.
 * The import feature replaces this with the real, validated import path.
 */
type Row = Record<string, string>;

export interface DemoCourse {
  courseCode: string;
  title: string;
  department: string;
  credits: number | null;
  level: string | null;
  elective: boolean;
  prerequisites: string;
  description: string | null;
}
export interface DemoOffering {
  term: string;
  courseCode: string;
  sections: number | null;
  capacity: number;
}
export interface DemoStudent {
  pseudonym: string;
  program: string | null;
  entryTerm: string | null;
  status: StudentStatus;
}
export interface DemoRecord {
  pseudonym: string;
  term: string;
  courseCode: string;
  grade: string;
  gradePoints: number | null;
  satisfaction: number | null;
  creditsAttempted: number | null;
}

export class DemoDataError extends Error {
  override name = 'DemoDataError';
}

export function parseCsv(content: string | Buffer): Row[] {
  return parse(content, {
    bom: true,
    columns: (header: string[]) => header.map((h) => h.trim().toLowerCase()),
    delimiter: [',', ';'],
    skip_empty_lines: true,
    trim: true,
  }) as Row[];
}

/** Line numbers count the header as line 1, as a spreadsheet shows them. */
function fail(file: string, index: number, column: string, reason: string): never {
  throw new DemoDataError(`${file}, line ${index + 2}, ${column}: ${reason}`);
}

function optionalText(value: string | undefined): string | null {
  return value ? value : null;
}

function optionalNumber(file: string, i: number, column: string, value?: string): number | null {
  if (!value) return null;
  const n = Number(value);
  if (!Number.isFinite(n) || n < 0) fail(file, i, column, `'${value}' is not a number.`);
  return n;
}

function courseCode(file: string, i: number, value: string | undefined): string {
  const code = normalizeCourseCode(value ?? '');
  if (!code) fail(file, i, 'course_code', `'${value ?? ''}' is not a course code like CMP 2310.`);
  return code;
}

function term(file: string, i: number, column: string, value: string | undefined): string {
  if (!value || !isTerm(value))
    fail(file, i, column, `'${value ?? ''}' is not a term like 2025-FA.`);
  return value;
}

export function readCatalogue(rows: Row[]): DemoCourse[] {
  const file = 'catalogue.csv';
  return rows.map((row, i) => {
    if (!row.title) fail(file, i, 'title', 'is empty.');
    const department = (row.department ?? '').toUpperCase();
    if (!/^[A-Z]{2,6}$/.test(department)) fail(file, i, 'department', 'is not a short code.');
    const elective = (row.elective ?? '').toLowerCase();
    return {
      courseCode: courseCode(file, i, row.course_code),
      title: row.title,
      department,
      credits: optionalNumber(file, i, 'credits', row.credits),
      level: optionalText(row.level),
      elective: !['no', 'n', 'false', '0'].includes(elective),
      prerequisites: row.prerequisites ?? '',
      description: optionalText(row.description),
    };
  });
}

export function readOfferings(rows: Row[]): DemoOffering[] {
  const file = 'offerings.csv';
  return rows.map((row, i) => {
    const capacity = optionalNumber(file, i, 'capacity', row.capacity);
    if (capacity === null) fail(file, i, 'capacity', 'is empty.');
    const sections = optionalNumber(file, i, 'sections', row.sections);
    return {
      term: term(file, i, 'term', row.term),
      courseCode: courseCode(file, i, row.course_code),
      sections: sections === null ? null : Math.round(sections),
      capacity: Math.round(capacity),
    };
  });
}

export function readStudents(rows: Row[], pseudonymise: (id: string) => string): DemoStudent[] {
  const file = 'students.csv';
  return rows.map((row, i) => {
    if (!row.student_id) fail(file, i, 'student_id', 'is empty.');
    const status = (row.status || 'active').toLowerCase() as StudentStatus;
    if (!STUDENT_STATUSES.includes(status)) fail(file, i, 'status', `'${row.status}' is unknown.`);
    return {
      pseudonym: pseudonymise(row.student_id),
      program: optionalText(row.program),
      entryTerm: row.entry_term ? term(file, i, 'entry_term', row.entry_term) : null,
      status,
    };
  });
}

export function readRecords(
  rows: Row[],
  pseudonymise: (id: string) => string,
  scale: readonly GradeScaleEntry[],
): DemoRecord[] {
  const file = 'records.csv';
  return rows.map((row, i) => {
    if (!row.student_id) fail(file, i, 'student_id', 'is empty.');
    const grade = readGrade(row.grade ?? '', scale);
    if (grade.kind === 'unknown')
      fail(file, i, 'grade', `'${row.grade ?? ''}' is not on the grade scale.`);
    const satisfaction = optionalNumber(file, i, 'satisfaction', row.satisfaction);
    if (
      satisfaction !== null &&
      (!Number.isInteger(satisfaction) || satisfaction < 1 || satisfaction > 5)
    ) {
      fail(file, i, 'satisfaction', `'${row.satisfaction}' is not a whole number from 1 to 5.`);
    }
    return {
      pseudonym: pseudonymise(row.student_id),
      term: term(file, i, 'term', row.term),
      courseCode: courseCode(file, i, row.course_code),
      grade: grade.kind === 'points' ? (row.grade ?? '') : grade.letter,
      gradePoints: grade.points,
      satisfaction,
      creditsAttempted: optionalNumber(file, i, 'credits_attempted', row.credits_attempted),
    };
  });
}
