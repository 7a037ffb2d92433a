import { DEFAULT_GRADE_SCALE, normalizeCourseCode, readGrade } from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';

describe('grade mapping with the default scale', () => {
  it('maps every letter of data.md to its grade points', () => {
    const expected: Record<string, number> = {
      A: 4.0,
      'A-': 3.7,
      'B+': 3.3,
      B: 3.0,
      'B-': 2.7,
      'C+': 2.3,
      C: 2.0,
      'C-': 1.7,
      'D+': 1.3,
      D: 1.0,
      'D-': 0.7,
      F: 0.0,
    };
    for (const [letter, points] of Object.entries(expected)) {
      expect(readGrade(letter)).toEqual({ kind: 'letter', letter, points });
    }
  });

  it('gives marks no grade points, and only P passes among them', () => {
    for (const mark of ['W', 'I', 'IP', 'AU', 'P', 'NP']) {
      expect(readGrade(mark)).toEqual({ kind: 'mark', letter: mark, points: null });
    }
    const passingMarks = DEFAULT_GRADE_SCALE.filter((g) => g.points === null && g.passing);
    expect(passingMarks.map((g) => g.letter)).toEqual(['P']);
  });

  it('reads letters regardless of case and blanks', () => {
    expect(readGrade(' b+ ')).toEqual({ kind: 'letter', letter: 'B+', points: 3.3 });
  });

  it('takes a number within the scale as grade points and refuses others', () => {
    expect(readGrade('3.5')).toEqual({ kind: 'points', points: 3.5 });
    expect(readGrade('4.5')).toEqual({ kind: 'unknown' });
    expect(readGrade('Q')).toEqual({ kind: 'unknown' });
    expect(readGrade('')).toEqual({ kind: 'unknown' });
  });

  it('passes at D- or better by default', () => {
    const passing = DEFAULT_GRADE_SCALE.filter((g) => g.points !== null && g.passing);
    expect(Math.min(...passing.map((g) => g.points as number))).toBe(0.7);
  });
});

describe('course codes', () => {
  it('stores letters, one space, digits', () => {
    expect(normalizeCourseCode('cmp2310')).toBe('CMP 2310');
    expect(normalizeCourseCode(' CMP 2310 ')).toBe('CMP 2310');
    expect(normalizeCourseCode('CMP  2310')).toBeNull();
    expect(normalizeCourseCode('2310 CMP')).toBeNull();
  });
});
