/**
 * The term data the demand outlook reads (method.md, "Demand forecast for a term T"), as
 * typed arrays indexed by student and course number. The caller maps codes and terms to
 * these numbers; terms are ordinals that grow by one from each term to the next.
 */

/** A prerequisite expression over course numbers. */
export type Prerequisite = { course: number } | { all: Prerequisite[] } | { any: Prerequisite[] };

/** Marks a student whose entry term is unknown. */
export const NO_TERM = -2147483648;

export interface OutlookData {
  /** Terms per year of study in the institution's calendar (4 in ours). */
  termsPerYear: number;
  courseCount: number;
  /** Course level (e.g. 4 for a 4000-level course); 0 when unknown. */
  courseLevel: Int32Array;
  courseElective: Uint8Array;
  /** Per course; null when it has none. */
  prerequisites: readonly (Prerequisite | null)[];
  /** Programmes are 0..programmeCount-1; students of unknown programme share one of them. */
  programmeCount: number;
  studentProgramme: Int32Array;
  /** Term ordinal of entry, NO_TERM when unknown. */
  studentEntry: Int32Array;
  /** Records grouped by student (recordFrom[s]..recordFrom[s+1]), in term order within each. */
  recordFrom: Int32Array;
  recordCourse: Int32Array;
  recordTerm: Int32Array;
  /** 1 when the record passes the course (data.md). */
  recordPassed: Uint8Array;
  /** Offered electives per term ordinal. */
  offerings: ReadonlyMap<number, Int32Array>;
}

/** True when the prerequisite is met by `passed` (1 per passed course). */
export function prerequisiteMet(node: Prerequisite | null, passed: Uint8Array): boolean {
  if (node === null) return true;
  if ('course' in node) return passed[node.course] === 1;
  if ('all' in node) return node.all.every((n) => prerequisiteMet(n, passed));
  return node.any.some((n) => prerequisiteMet(n, passed));
}

/**
 * Per student the terms they have records in (student-terms), each with its elective and
 * total record counts: stage, latest term and load features all read from these.
 */
export interface StudentTerms {
  from: Int32Array;
  term: Int32Array;
  electives: Int32Array;
  all: Int32Array;
  /** Distinct record terms, in order. */
  recordTerms: Int32Array;
  /** Students with records in each term. */
  byTerm: Map<number, Int32Array>;
}

export function studentTerms(data: OutlookData): StudentTerms {
  const students = data.recordFrom.length - 1;
  const from = new Int32Array(students + 1);
  const term: number[] = [];
  const electives: number[] = [];
  const all: number[] = [];
  const byTerm = new Map<number, number[]>();
  for (let s = 0; s < students; s++) {
    from[s] = term.length;
    for (let r = data.recordFrom[s]; r < data.recordFrom[s + 1]; r++) {
      const t = data.recordTerm[r];
      if (term.length === from[s] || term[term.length - 1] !== t) {
        if (term.length > from[s] && term[term.length - 1] > t) {
          throw new Error('Records must be in term order within each student.');
        }
        term.push(t);
        electives.push(0);
        all.push(0);
        let list = byTerm.get(t);
        if (!list) byTerm.set(t, (list = []));
        list.push(s);
      }
      all[all.length - 1]++;
      if (data.courseElective[data.recordCourse[r]]) electives[electives.length - 1]++;
    }
  }
  from[students] = term.length;
  const recordTerms = Int32Array.from([...byTerm.keys()].sort((a, b) => a - b));
  return {
    from,
    term: Int32Array.from(term),
    electives: Int32Array.from(electives),
    all: Int32Array.from(all),
    recordTerms,
    byTerm: new Map([...byTerm].map(([t, list]) => [t, Int32Array.from(list)])),
  };
}

/** Number of the student's record terms before `term`. */
export function termsBefore(st: StudentTerms, s: number, term: number): number {
  let n = 0;
  for (let i = st.from[s]; i < st.from[s + 1] && st.term[i] < term; i++) n++;
  return n;
}

export const STAGES = 10;
export const YEARS = 7;

/** Stage k(s,h) = min(9, distinct record terms of s before h). */
export function stageOf(st: StudentTerms, s: number, term: number): number {
  return Math.min(STAGES - 1, termsBefore(st, s, term));
}

/** Year y(s,h) = clip(floor((h - entry) / termsPerYear) + 1, 0, 6); 0 when entry is unknown. */
export function yearOf(data: OutlookData, s: number, term: number): number {
  const entry = data.studentEntry[s];
  if (entry === NO_TERM) return 0;
  const y = Math.floor((term - entry) / data.termsPerYear) + 1;
  return Math.max(0, Math.min(YEARS - 1, y));
}

/**
 * Marks in `passed` (cleared first for the courses marked last time, listed in `list`) the
 * courses s passed before `term`; returns how many are in `list`.
 */
export function markPassed(
  data: OutlookData,
  s: number,
  term: number,
  passed: Uint8Array,
  list: Int32Array,
  count: number,
): number {
  for (let i = 0; i < count; i++) passed[list[i]] = 0;
  let n = 0;
  for (let r = data.recordFrom[s]; r < data.recordFrom[s + 1]; r++) {
    if (data.recordTerm[r] >= term) break;
    const c = data.recordCourse[r];
    if (data.recordPassed[r] && !passed[c]) {
      passed[c] = 1;
      list[n++] = c;
    }
  }
  return n;
}
