import type { GradeScaleModel } from '../grade-scale/grade-scale.model';

/** One attempt of one course by the student, as stored. */
export interface Attempt {
  term: string;
  courseCode: string;
  grade: string;
  gradePoints: number | null;
  satisfaction: number | null;
  creditsAttempted: number | null;
}

/** Which attempts pass (data.md): a letter at or above the threshold, points likewise, or P. */
export interface PassRule {
  thresholdPoints: number;
  passingMarks: ReadonlySet<string>;
}

export function passRule(scale: GradeScaleModel): PassRule {
  const passing = scale.letters.filter((e) => e.passing).map((e) => e.points as number);
  return {
    thresholdPoints: passing.length ? Math.min(...passing) : Infinity,
    passingMarks: new Set(scale.marks.filter((m) => m.passing).map((m) => m.letter.toUpperCase())),
  };
}

export function passes(attempt: Attempt, rule: PassRule): boolean {
  if (attempt.gradePoints !== null) return attempt.gradePoints >= rule.thresholdPoints;
  return rule.passingMarks.has(attempt.grade.trim().toUpperCase());
}

export function passedCourses(attempts: readonly Attempt[], rule: PassRule): Set<string> {
  const passed = new Set<string>();
  for (const a of attempts) if (passes(a, rule)) passed.add(a.courseCode);
  return passed;
}
