import { normalizeCourseCode, STUDENT_STATUSES, TERM_PATTERN } from '@kinpath/contracts';
import type { ImportKind } from '@kinpath/contracts';
import type { GradeScaleModel } from '../../grade-scale/grade-scale.model';
import { parsePrerequisites } from './prerequisites';

import { STUDENT_NUMBER_MARK } from './withhold';

/** Shown instead of a student number in every rejection: reports never hold the raw id. */
export const WITHHELD_STUDENT_ID = STUDENT_NUMBER_MARK;

/** Longest text each field may hold (data.md, text limits); longer is refused per row. */
export const TEXT_LIMITS: Readonly<Record<string, number>> = {
  course_code: 16,
  title: 200,
  description: 4000,
  department: 16,
  program: 100,
  level: 32,
  prerequisites: 2000,
};

export interface RuleContext {
  /** Course codes already in the catalogue. */
  knownCourses: ReadonlySet<string>;
  scale: GradeScaleModel;
  /** Student number to pseudonym; the number is not kept beyond this call. */
  pseudonymFor(studentId: string): string;
  /** The institution's student-number form (config); the default when absent. */
  studentNumber?: string;
}

/** Reports one rejected cell; `column` is the field, the caller names the file's header. */
export type Reject = (field: string, value: string, reason: string) => void;

/** Field values of one row, by field name; absent optional columns read as ''. */
export type RowCells = (field: string) => string;

/**
 * The rules of one kind. `check` returns the row as stored (the staging table's
 * columns, null for empty) or null when it rejected something.
 */
export interface KindRules {
  readonly kind: ImportKind;
  readonly columns: readonly string[];
  /** Rows are held until `finish`, which may still reject some (prerequisites name later rows). */
  readonly deferred: boolean;
  check(cell: RowCells, line: number, reject: Reject): (string | null)[] | null;
  finish?(rejectLine: (line: number, field: string, value: string, reason: string) => void): void;
}

const INTEGER = /^\d+$/;
const DECIMAL = /^\d{1,3}(?:\.\d{1,2})?$/;
const DEPARTMENT = /^[A-Za-z]{2,6}$/;

function cached<T>(compute: (value: string) => T): (value: string) => T {
  const memo = new Map<string, T>();
  return (value) => {
    let result = memo.get(value);
    if (result === undefined && !memo.has(value)) {
      result = compute(value);
      if (memo.size < 100_000) memo.set(value, result);
    }
    return result as T;
  };
}

const courseCode = cached((value: string) => normalizeCourseCode(value));
const term = cached((value: string) => {
  const t = value.trim().toUpperCase();
  return TERM_PATTERN.test(t) ? t : null;
});

function checkCourse(
  cell: RowCells,
  reject: Reject,
  known: ReadonlySet<string> | null,
  field = 'course_code',
): string | null {
  const raw = cell(field);
  if (raw.trim() === '') {
    reject(field, raw, 'is required');
    return null;
  }
  const code = courseCode(raw);
  if (code === null) {
    reject(field, raw, `'${raw}' is not a course code (letters then digits, e.g. CMP 2310)`);
    return null;
  }
  if (known && !known.has(code)) {
    reject(field, raw, `course '${code}' is not in the catalogue`);
    return null;
  }
  return code;
}

function checkTerm(
  cell: RowCells,
  reject: Reject,
  field: string,
  required: boolean,
): string | null {
  const raw = cell(field);
  if (raw.trim() === '') {
    if (required) reject(field, raw, 'is required');
    return null;
  }
  const value = term(raw);
  if (value === null) {
    reject(field, raw, `'${raw}' is not a term of the form YYYY-XX (XX one of WI, SP, SU, FA)`);
  }
  return value;
}

function checkRequiredText(cell: RowCells, reject: Reject, field: string): string | null {
  const value = cell(field).trim();
  if (value === '') {
    reject(field, cell(field), 'is required');
    return null;
  }
  return value;
}

function optionalText(cell: RowCells, field: string): string | null {
  const value = cell(field).trim();
  return value === '' ? null : value;
}

function checkNumber(
  cell: RowCells,
  reject: Reject,
  field: string,
  form: 'integer' | 'decimal',
  required: boolean,
): string | null | undefined {
  const raw = cell(field);
  const value = raw.trim();
  if (value === '') {
    if (required) {
      reject(field, raw, 'is required');
      return undefined;
    }
    return null;
  }
  if (form === 'integer' ? !INTEGER.test(value) || value.length > 9 : !DECIMAL.test(value)) {
    reject(
      field,
      raw,
      form === 'integer'
        ? `'${raw}' is not a whole number of 0 or more`
        : `'${raw}' is not a number from 0 to 999.99`,
    );
    return undefined;
  }
  return String(Number(value));
}

function checkStudent(
  cell: RowCells,
  reject: Reject,
  context: RuleContext,
  pseudonyms: Map<string, { pseudonym: string; key: string }>,
): { pseudonym: string; key: string } | null {
  const raw = cell('student_id');
  const id = raw.trim().toUpperCase();
  if (id === '') {
    reject('student_id', WITHHELD_STUDENT_ID, 'is required');
    return null;
  }
  if (id.length > 64 || !/^[\x21-\x7e]+$/.test(id)) {
    reject(
      'student_id',
      WITHHELD_STUDENT_ID,
      'is not a student number (up to 64 letters, digits or signs, no spaces)',
    );
    return null;
  }
  let student = pseudonyms.get(id);
  if (student === undefined) {
    // A short key keeps the duplicate check small on files of a million rows.
    student = { pseudonym: context.pseudonymFor(id), key: pseudonyms.size.toString(36) };
    pseudonyms.set(id, student);
  }
  return student;
}

/** Remembers each key's first line, to name it when the key comes again. */
class KeyLines {
  private readonly lines = new Map<string, number>();

  /** The line where the key was first seen, or undefined (and remembered) when new. */
  seen(key: string, line: number): number | undefined {
    const first = this.lines.get(key);
    if (first === undefined) this.lines.set(key, line);
    return first;
  }
}

const YES = new Set(['yes', 'y', 'true', '1']);
const NO = new Set(['no', 'n', 'false', '0']);

function catalogueRules(context: RuleContext): KindRules {
  const keys = new KeyLines();
  const fileCourses = new Set<string>();
  const pending: { line: number; code: string; raw: string; courses: string[] }[] = [];
  return {
    kind: 'catalogue',
    columns: [
      'course_code',
      'title',
      'department',
      'credits',
      'level',
      'elective',
      'prerequisites',
      'description',
    ],
    deferred: true,
    check(cell, line, reject) {
      let ok = true;
      const bad: Reject = (f, v, r) => {
        ok = false;
        reject(f, v, r);
      };
      const code = checkCourse(cell, bad, null);
      const title = checkRequiredText(cell, bad, 'title');
      const departmentRaw = cell('department');
      let department: string | null = null;
      if (departmentRaw.trim() === '') bad('department', departmentRaw, 'is required');
      else if (!DEPARTMENT.test(departmentRaw.trim())) {
        bad(
          'department',
          departmentRaw,
          `'${departmentRaw}' is not a department code (2 to 6 letters)`,
        );
      } else department = departmentRaw.trim().toUpperCase();
      const credits = checkNumber(cell, bad, 'credits', 'decimal', false);
      const electiveRaw = cell('elective').trim().toLowerCase();
      let elective = 'true';
      if (NO.has(electiveRaw)) elective = 'false';
      else if (electiveRaw !== '' && !YES.has(electiveRaw)) {
        bad('elective', cell('elective'), `'${cell('elective')}' is not yes or no`);
      }
      const prerequisitesRaw = cell('prerequisites');
      const parsed = parsePrerequisites(prerequisitesRaw);
      if (!parsed.ok) {
        bad(
          'prerequisites',
          prerequisitesRaw,
          `'${prerequisitesRaw}' does not parse: ${parsed.error}`,
        );
      } else if (code !== null && parsed.courses.includes(code)) {
        bad('prerequisites', prerequisitesRaw, `course '${code}' cannot be its own prerequisite`);
      }
      if (code !== null) {
        const first = keys.seen(code, line);
        if (first !== undefined) {
          bad('course_code', cell('course_code'), `'${code}' comes twice: also on line ${first}`);
        }
      }
      if (!ok || !parsed.ok) return null;
      fileCourses.add(code as string);
      if (parsed.courses.length) {
        pending.push({
          line,
          code: code as string,
          raw: prerequisitesRaw,
          courses: parsed.courses,
        });
      }
      return [
        code,
        title,
        department,
        credits ?? null,
        optionalText(cell, 'level'),
        elective,
        parsed.normalized,
        optionalText(cell, 'description'),
      ];
    },
    finish(rejectLine) {
      for (const row of pending) {
        const unknown = row.courses.filter(
          (c) => !fileCourses.has(c) && !context.knownCourses.has(c),
        );
        if (unknown.length) {
          rejectLine(
            row.line,
            'prerequisites',
            row.raw,
            `${unknown.map((c) => `'${c}'`).join(', ')} ${unknown.length === 1 ? 'is' : 'are'} not in the catalogue`,
          );
        }
      }
    },
  };
}

function offeringsRules(context: RuleContext): KindRules {
  const keys = new KeyLines();
  return {
    kind: 'offerings',
    columns: ['term', 'course_code', 'sections', 'capacity'],
    deferred: false,
    check(cell, line, reject) {
      let ok = true;
      const bad: Reject = (f, v, r) => {
        ok = false;
        reject(f, v, r);
      };
      const t = checkTerm(cell, bad, 'term', true);
      const code = checkCourse(cell, bad, context.knownCourses);
      const sections = checkNumber(cell, bad, 'sections', 'integer', false);
      const capacity = checkNumber(cell, bad, 'capacity', 'integer', true);
      if (t !== null && code !== null) {
        const first = keys.seen(`${t}|${code}`, line);
        if (first !== undefined) {
          bad(
            'course_code',
            cell('course_code'),
            `${t} ${code} comes twice: also on line ${first}`,
          );
        }
      }
      return ok ? [t, code, sections ?? null, capacity ?? null] : null;
    },
  };
}

function studentsRules(context: RuleContext): KindRules {
  const keys = new KeyLines();
  const pseudonyms = new Map<string, { pseudonym: string; key: string }>();
  return {
    kind: 'students',
    columns: ['pseudonym', 'program', 'entry_term', 'status'],
    deferred: false,
    check(cell, line, reject) {
      let ok = true;
      const bad: Reject = (f, v, r) => {
        ok = false;
        reject(f, v, r);
      };
      const student = checkStudent(cell, bad, context, pseudonyms);
      const entryTerm = checkTerm(cell, bad, 'entry_term', false);
      const statusRaw = cell('status');
      let status = statusRaw
        .trim()
        .toLowerCase()
        .replace(/[\s-]+/g, '_');
      if (status === '') status = 'active';
      else if (!(STUDENT_STATUSES as readonly string[]).includes(status)) {
        bad('status', statusRaw, `'${statusRaw}' is not one of ${STUDENT_STATUSES.join(', ')}`);
      }
      if (student) {
        const first = keys.seen(student.key, line);
        if (first !== undefined) {
          bad(
            'student_id',
            WITHHELD_STUDENT_ID,
            `the same student comes twice: also on line ${first}`,
          );
        }
      }
      return ok ? [student!.pseudonym, optionalText(cell, 'program'), entryTerm, status] : null;
    },
  };
}

function recordsRules(context: RuleContext): KindRules {
  const keys = new KeyLines();
  const pseudonyms = new Map<string, { pseudonym: string; key: string }>();
  const grades = new Map<string, string | null>();
  return {
    kind: 'records',
    columns: [
      'student_pseudonym',
      'term',
      'course_code',
      'grade',
      'satisfaction',
      'credits_attempted',
    ],
    deferred: false,
    check(cell, line, reject) {
      let ok = true;
      const bad: Reject = (f, v, r) => {
        ok = false;
        reject(f, v, r);
      };
      const student = checkStudent(cell, bad, context, pseudonyms);
      const t = checkTerm(cell, bad, 'term', true);
      const code = checkCourse(cell, bad, context.knownCourses);
      const gradeRaw = cell('grade');
      let grade = grades.get(gradeRaw);
      if (grade === undefined) {
        grade = gradeRaw.trim() === '' ? null : (context.scale.read(gradeRaw)?.grade ?? null);
        grades.set(gradeRaw, grade);
      }
      if (grade === null) {
        bad(
          'grade',
          gradeRaw,
          gradeRaw.trim() === '' ? 'is required' : context.scale.describeUnknown(gradeRaw),
        );
      }
      const satisfactionRaw = cell('satisfaction');
      const satisfaction = satisfactionRaw.trim();
      if (satisfaction !== '' && !/^[1-5]$/.test(satisfaction)) {
        bad(
          'satisfaction',
          satisfactionRaw,
          `'${satisfactionRaw}' is not a whole number from 1 to 5`,
        );
      }
      const credits = checkNumber(cell, bad, 'credits_attempted', 'decimal', false);
      if (student && t !== null && code !== null) {
        const first = keys.seen(`${student.key}|${t}|${code}`, line);
        if (first !== undefined) {
          bad(
            'course_code',
            cell('course_code'),
            `the same student, term and course come twice: also on line ${first}`,
          );
        }
      }
      return ok
        ? [student!.pseudonym, t, code, grade, satisfaction || null, credits ?? null]
        : null;
    },
  };
}

export function rulesFor(kind: ImportKind, context: RuleContext): KindRules {
  switch (kind) {
    case 'catalogue':
      return catalogueRules(context);
    case 'offerings':
      return offeringsRules(context);
    case 'students':
      return studentsRules(context);
    case 'records':
      return recordsRules(context);
  }
}
