import { DEFAULT_GRADE_SCALE } from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';
import { DEFAULT_SCALE_MODEL, GradeScaleModel } from '../grade-scale/grade-scale.model';
import { parsePrerequisites, type PrerequisiteNode } from '../imports/validation/prerequisites';
import type { CatalogueEntry } from '../model/model-snapshot';
import { passedCourses, passes, passRule, type Attempt } from './attempts';
import { likenessShares, overallBasis } from './electives.service';
import { ineligibleReasons, unmetPrerequisites } from './eligibility';
import { nearestLetter } from './grade-letters';
import { standing } from './standing';

const rule = passRule(DEFAULT_SCALE_MODEL);

function attempt(
  term: string,
  courseCode: string,
  grade: string,
  creditsAttempted: number | null = 3,
): Attempt {
  const read = DEFAULT_SCALE_MODEL.read(grade);
  return {
    term,
    courseCode,
    grade,
    gradePoints: read?.points ?? null,
    satisfaction: null,
    creditsAttempted,
  };
}

function prerequisites(text: string): PrerequisiteNode | null {
  const parsed = parsePrerequisites(text);
  if (!parsed.ok) throw new Error(parsed.error);
  return parsed.expression;
}

function course(code: string, prereq = ''): CatalogueEntry {
  return {
    courseCode: code,
    title: code,
    department: code.slice(0, 3),
    credits: 3,
    elective: true,
    prerequisites: prerequisites(prereq),
  };
}

describe('which attempts pass', () => {
  it('passes a letter at D- or better and P, fails F and the other marks', () => {
    expect(passes(attempt('2024-FA', 'CMP 1110', 'D-'), rule)).toBe(true);
    expect(passes(attempt('2024-FA', 'CMP 1110', 'F'), rule)).toBe(false);
    expect(passes(attempt('2024-FA', 'CMP 1110', 'P'), rule)).toBe(true);
    for (const mark of ['W', 'I', 'IP', 'AU', 'NP']) {
      expect(passes(attempt('2024-FA', 'CMP 1110', mark), rule)).toBe(false);
    }
    expect(passes(attempt('2024-FA', 'CMP 1110', '0.7'), rule)).toBe(true);
    expect(passes(attempt('2024-FA', 'CMP 1110', '0.5'), rule)).toBe(false);
  });

  it('follows an edited threshold (C- to pass)', () => {
    const strict = new GradeScaleModel(
      DEFAULT_GRADE_SCALE.map((e) => (e.points !== null ? { ...e, passing: e.points >= 1.7 } : e)),
    );
    const strictRule = passRule(strict);
    expect(passes(attempt('2024-FA', 'CMP 1110', 'C-'), strictRule)).toBe(true);
    expect(passes(attempt('2024-FA', 'CMP 1110', 'D+'), strictRule)).toBe(false);
  });
});

describe('credits earned and grade-point average', () => {
  const catalogue = (code: string) => (code === 'MTH 1110' ? 4 : 3);

  it('counts each passed course once and only the latest graded attempt in the average', () => {
    const attempts = [
      attempt('2023-FA', 'CMP 1110', 'F'),
      attempt('2024-WI', 'CMP 1110', 'B'), // retake replaces the F in the average
      attempt('2024-SP', 'CMP 1110', 'W'), // a mark neither replaces nor dilutes the B
      attempt('2023-FA', 'MTH 1110', 'A', 4),
      attempt('2024-FA', 'ART 1110', 'P'), // passes, earns credits, no grade points
      attempt('2024-FA', 'HIS 1110', 'F'),
    ];
    const result = standing(attempts, rule, catalogue);
    expect(result.creditsEarned).toBe(3 + 4 + 3);
    // (3 * 3.0 + 4 * 4.0 + 3 * 0.0) / 10
    expect(result.gradePointAverage).toBeCloseTo(2.5, 12);
  });

  it('orders attempts by the registrar term order (WI < SP < SU < FA), not by text', () => {
    const attempts = [attempt('2024-FA', 'CMP 1110', 'A'), attempt('2024-SP', 'CMP 1110', 'C')];
    expect(standing(attempts, rule, catalogue).gradePointAverage).toBe(4);
  });

  it("uses the catalogue's credits when the record has none, and has no average without grades", () => {
    expect(standing([attempt('2024-FA', 'MTH 1110', 'B', null)], rule, catalogue)).toEqual({
      creditsEarned: 4,
      gradePointAverage: 3,
    });
    expect(standing([attempt('2024-FA', 'ART 1110', 'P')], rule, catalogue)).toEqual({
      creditsEarned: 3,
      gradePointAverage: null,
    });
  });
});

describe('eligibility', () => {
  const passed = passedCourses(
    [
      attempt('2024-FA', 'CMP 1110', 'B'),
      attempt('2024-FA', 'MTH 1110', 'F'),
      attempt('2025-WI', 'ART 1110', 'P'),
    ],
    rule,
  );

  it('names the part of a prerequisite expression not yet met', () => {
    expect(unmetPrerequisites(prerequisites('CMP 1110'), passed)).toBeNull();
    expect(unmetPrerequisites(prerequisites('CMP 2210 OR CMP 1110'), passed)).toBeNull();
    expect(
      unmetPrerequisites(prerequisites('CMP 1110 AND (MTH 1110 OR MTH 1210)'), passed),
    ).toEqual(prerequisites('MTH 1110 OR MTH 1210'));
  });

  it('gives every reason: already passed, a prerequisite not passed, not offered', () => {
    expect(ineligibleReasons(course('CMP 2110', 'CMP 1110'), passed, true, '2026-FA')).toEqual([]);
    expect(ineligibleReasons(course('ART 1110'), passed, true, '2026-FA')).toEqual([
      { code: 'already_passed', message: 'Already passed.' },
    ]);
    expect(
      ineligibleReasons(course('MTH 2110', 'MTH 1110 AND CMP 1110'), passed, false, '2026-FA'),
    ).toEqual([
      { code: 'prerequisite_not_passed', message: 'Prerequisite not passed: MTH 1110.' },
      { code: 'not_offered', message: 'Not offered in 2026-FA.' },
    ]);
  });
});

describe('the letter nearest to predicted grade points', () => {
  const letters = DEFAULT_SCALE_MODEL.toApi().letters;

  it('rounds to the nearest letter of the scale', () => {
    expect(nearestLetter(3.9, letters)).toBe('A');
    expect(nearestLetter(3.4, letters)).toBe('B+');
    expect(nearestLetter(0.2, letters)).toBe('F');
    expect(nearestLetter(4, letters)).toBe('A');
  });

  it('gives the lower letter halfway between two', () => {
    expect(nearestLetter(3.15, letters)).toBe('B');
    expect(nearestLetter(3.85, letters)).toBe('A-');
  });

  it('has no letter without a prediction or a scale', () => {
    expect(nearestLetter(null, letters)).toBeNull();
    expect(nearestLetter(3, [])).toBeNull();
  });
});

describe('the basis of an elective', () => {
  it('is kin only when every shown value comes from kin', () => {
    expect(overallBasis(['neighbours', 'neighbours'])).toBe('neighbours');
    expect(overallBasis(['neighbours', 'none'])).toBe('neighbours');
    expect(overallBasis(['neighbours', 'baseline'])).toBe('baseline');
    expect(overallBasis(['none', 'none'])).toBe('none');
  });
});

describe('shares of the likeness in the explanation', () => {
  it('are shares of the positive part: they never pass 100 % and what pulled it down is said', () => {
    const { top, against } = likenessShares([
      { course: 'A', contribution: 3 },
      { course: 'B', contribution: 1 },
      { course: 'C', contribution: -2 },
    ]);
    expect(top).toEqual([
      { course: 'A', share: 0.75 },
      { course: 'B', share: 0.25 },
    ]);
    expect(against).toBe(0.5);
    expect(likenessShares([{ course: 'C', contribution: -1 }])).toEqual({ top: [], against: 0 });
  });
});
