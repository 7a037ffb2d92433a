import type { GradeScale, GradeScaleEntry } from '@kinpath/contracts';
import { DEFAULT_GRADE_SCALE, DEFAULT_PASSING_THRESHOLD } from '@kinpath/contracts';

export type GradeReading = { grade: string; points: number | null };

const NUMBER = /^\d+(?:\.\d+)?$/;

/**
 * Reads grade cells against one scale: a letter or mark (any case) gives its
 * stored form; a number within the scale's range is grade points (data.md).
 */
export class GradeScaleModel {
  readonly letters: GradeScaleEntry[];
  readonly marks: GradeScaleEntry[];
  readonly minPoints: number;
  readonly maxPoints: number;
  private readonly byKey = new Map<string, GradeScaleEntry>();

  constructor(entries: readonly GradeScaleEntry[]) {
    this.letters = entries.filter((e) => e.points !== null);
    this.marks = entries.filter((e) => e.points === null);
    const points = this.letters.map((e) => e.points as number);
    this.minPoints = points.length ? Math.min(...points) : 0;
    this.maxPoints = points.length ? Math.max(...points) : 0;
    for (const entry of entries) this.byKey.set(entry.letter.toUpperCase(), entry);
  }

  read(value: string): GradeReading | null {
    const given = value.trim();
    const entry = this.byKey.get(given.toUpperCase());
    if (entry) return { grade: entry.letter, points: entry.points };
    if (NUMBER.test(given) && this.letters.length > 0) {
      const points = Number(given);
      if (points >= this.minPoints && points <= this.maxPoints) {
        return { grade: String(points), points };
      }
    }
    return null;
  }

  /** "'Q' is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP)". */
  describeUnknown(value: string): string {
    const first = this.letters[0]?.letter;
    const last = this.letters[this.letters.length - 1]?.letter;
    const range = first === undefined ? 'empty' : first === last ? first : `${first} … ${last}`;
    const marks = this.marks.map((m) => m.letter).join(', ');
    const numbers = this.letters.length
      ? `, nor grade points from ${this.minPoints} to ${this.maxPoints}`
      : '';
    return `'${value}' is not on the grade scale (${range}) nor a mark (${marks || 'none'})${numbers}`;
  }

  /** The lowest passing letter: the threshold letters with at least its points pass. */
  passingThreshold(): string {
    const passing = this.letters.filter((e) => e.passing);
    return passing.length
      ? passing.reduce((low, e) => ((e.points as number) < (low.points as number) ? e : low)).letter
      : DEFAULT_PASSING_THRESHOLD;
  }

  toApi(): GradeScale {
    return {
      letters: this.letters.map((e) => ({ letter: e.letter, points: e.points as number })),
      marks: this.marks.map((e) => ({ letter: e.letter, passing: e.passing })),
      passingThreshold: this.passingThreshold(),
      minPoints: this.minPoints,
      maxPoints: this.maxPoints,
    };
  }
}

export const DEFAULT_SCALE_MODEL = new GradeScaleModel(DEFAULT_GRADE_SCALE);

/** Reads the stored scale through any query function (a pool, a transaction's client). */
export async function loadGradeScale(
  query: (sql: string) => Promise<{ letter: string; points: string | null; passing: boolean }[]>,
): Promise<GradeScaleModel> {
  const rows = await query(`SELECT letter, points, passing FROM grade_scale ORDER BY sort_order`);
  return new GradeScaleModel(
    rows.map((r) => ({
      letter: r.letter,
      points: r.points === null ? null : Number(r.points),
      passing: r.passing,
    })),
  );
}
