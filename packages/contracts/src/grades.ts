/**
 * The default grade scale of data.md: the common 4-point letter scale, plus
 * marks that carry no grade points. Registrar staff may edit the stored scale;
 * this is what a new database starts with.
 */
export interface GradeScaleEntry {
  letter: string;
  /** Grade points; null for a mark. */
  points: number | null;
  /** Whether this grade passes the course. */
  passing: boolean;
}

export const DEFAULT_LETTER_GRADES: readonly GradeScaleEntry[] = [
  { letter: 'A', points: 4.0, passing: true },
  { letter: 'A-', points: 3.7, passing: true },
  { letter: 'B+', points: 3.3, passing: true },
  { letter: 'B', points: 3.0, passing: true },
  { letter: 'B-', points: 2.7, passing: true },
  { letter: 'C+', points: 2.3, passing: true },
  { letter: 'C', points: 2.0, passing: true },
  { letter: 'C-', points: 1.7, passing: true },
  { letter: 'D+', points: 1.3, passing: true },
  { letter: 'D', points: 1.0, passing: true },
  { letter: 'D-', points: 0.7, passing: true },
  { letter: 'F', points: 0.0, passing: false },
];

/** Marks count as attempts but carry no grade points; only P passes. */
export const DEFAULT_MARKS: readonly GradeScaleEntry[] = [
  { letter: 'W', points: null, passing: false },
  { letter: 'I', points: null, passing: false },
  { letter: 'IP', points: null, passing: false },
  { letter: 'AU', points: null, passing: false },
  { letter: 'P', points: null, passing: true },
  { letter: 'NP', points: null, passing: false },
];

export const DEFAULT_GRADE_SCALE: readonly GradeScaleEntry[] = [
  ...DEFAULT_LETTER_GRADES,
  ...DEFAULT_MARKS,
];

export type GradeReading =
  | { kind: 'letter'; letter: string; points: number }
  | { kind: 'mark'; letter: string; points: null }
  | { kind: 'points'; points: number }
  | { kind: 'unknown' };

/**
 * Reads a grade cell as given: a letter or mark of the scale (case-insensitive),
 * or a number within the scale's range, taken as grade points.
 */
export function readGrade(
  value: string,
  scale: readonly GradeScaleEntry[] = DEFAULT_GRADE_SCALE,
): GradeReading {
  const given = value.trim().toUpperCase();
  const entry = scale.find((e) => e.letter.toUpperCase() === given);
  if (entry) {
    return entry.points === null
      ? { kind: 'mark', letter: entry.letter, points: null }
      : { kind: 'letter', letter: entry.letter, points: entry.points };
  }
  if (/^\d+(\.\d+)?$/.test(given)) {
    const points = Number(given);
    const range = scale.filter((e) => e.points !== null).map((e) => e.points as number);
    if (range.length > 0 && points >= Math.min(...range) && points <= Math.max(...range)) {
      return { kind: 'points', points };
    }
  }
  return { kind: 'unknown' };
}
