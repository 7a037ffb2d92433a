import { termOrdinal } from '@kinpath/contracts';
import { outlook } from '@kinpath/engine';
import { describe, expect, it } from 'vitest';
import { DEFAULT_SCALE_MODEL } from '../grade-scale/grade-scale.model';
import { passRule } from '../students/attempts';
import { courseLevel, toOutlookInput, type CohortData } from './cohort';

const entry = (courseCode: string, elective: boolean, prerequisites: string | null = null) => ({
  courseCode,
  title: courseCode,
  department: courseCode.slice(0, 3),
  credits: 3,
  elective,
  prerequisites: prerequisites ? { type: 'course' as const, code: prerequisites } : null,
});

describe('the cohort as the outlook engine reads it', () => {
  it('takes the level from the catalogue, else from the course number', () => {
    expect(courseLevel('CMP 4110', '3000')).toBe(3);
    expect(courseLevel('CMP 4110', null)).toBe(4);
    expect(courseLevel('XYZ', null)).toBe(0);
  });

  it('numbers courses and students, orders records by term and marks passes', () => {
    // Records of b arrive out of term order; a W does not pass; c has no records.
    const cohort: CohortData = {
      stamp: 's',
      scale: DEFAULT_SCALE_MODEL,
      rule: passRule(DEFAULT_SCALE_MODEL),
      courses: new Map([
        ['CMP 1110', entry('CMP 1110', true)],
        ['CMP 2110', entry('CMP 2110', true, 'CMP 1110')],
        ['HRU 1010', entry('HRU 1010', false)],
      ]),
      offerings: new Map([
        [
          '2026-FA',
          new Map([
            ['CMP 2110', { capacity: 30, sections: 1 }],
            ['HRU 1010', { capacity: 99, sections: 3 }],
          ]),
        ],
      ]),
      students: new Map([
        ['a', { program: 'Computing BSc', entryTerm: '2025-FA', status: 'active' }],
        ['b', { program: null, entryTerm: null, status: 'graduated' }],
        ['c', { program: 'Computing BSc', entryTerm: '2026-FA', status: 'active' }],
      ]),
      pseudonyms: ['a', 'b'],
      from: Int32Array.from([0, 1, 3]),
      course: ['CMP 1110', 'CMP 2110', 'CMP 1110'],
      term: ['2025-FA', '2026-SP', '2025-FA'],
      ordinal: Int32Array.from(['2025-FA', '2026-SP', '2025-FA'], termOrdinal),
      grade: ['B', 'W', 'A'],
      points: Float64Array.from([3, NaN, 4]),
      satisfaction: Float64Array.from([NaN, NaN, NaN]),
      levels: new Map([
        ['CMP 1110', 1],
        ['CMP 2110', 2],
        ['HRU 1010', 1],
      ]),
    };
    const input = toOutlookInput(cohort);
    const d = input.data;
    expect(input.courses).toEqual(['CMP 1110', 'CMP 2110', 'HRU 1010']);
    expect(input.pseudonyms).toEqual(['a', 'b', 'c']);
    expect([...input.active]).toEqual([0, 2]);
    // Programme numbers, with the unknown programme a group of its own.
    expect(d.programmeCount).toBe(2);
    expect([...d.studentProgramme]).toEqual([0, 1, 0]);
    expect(d.studentEntry[1]).toBe(outlook.NO_TERM);
    expect([...d.recordFrom]).toEqual([0, 1, 3, 3]);
    // b: 2025-FA CMP 1110 (A, passed) before 2026-SP CMP 2110 (W, not passed).
    expect([...d.recordTerm.subarray(1, 3)]).toEqual([
      termOrdinal('2025-FA'),
      termOrdinal('2026-SP'),
    ]);
    expect([...d.recordCourse]).toEqual([0, 0, 1]);
    expect([...d.recordPassed]).toEqual([1, 1, 0]);
    // Only electives are offered to choose from; prerequisites as course numbers.
    expect([...d.offerings.get(termOrdinal('2026-FA'))!]).toEqual([1]);
    expect(d.prerequisites[1]).toEqual({ course: 0 });
    expect([...d.courseLevel]).toEqual([1, 2, 1]);
  });
});
