import { MEAN_CENTRED_MODEL_SETTINGS } from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';
import { termSortKey } from '../model/term-keys';
import { runBacktest, type BacktestInput, type BacktestRecords } from './backtest';

/**
 * A hand-made term history, small enough to work every prediction out on paper.
 *
 * Grade points; A, B, C are core courses (department HRU), X is a CMP elective,
 * Y an ART elective. 2024-WI, -SP and -SU are learnt from; 2024-FA is held out.
 *
 *   student  A  B  C  X     Y      mean of training values
 *   T1       4  2  3  4     3.25   16.25 / 5 = 3.25
 *   T2       2  4  3  2     2.75   13.75 / 5 = 2.75
 *   P1       4  2  3                9 / 3 = 3      held out: X = 3.7
 *   P2       3  3  3                9 / 3 = 3      held out: X = 2.0
 *   P3       2  2  2                6 / 3 = 2      held out: Y = 2.0
 *   P4       4  4  4               12 / 3 = 4      held out: Y = 4.0
 *
 * Global mean mu = (16.25 + 13.75 + 9 + 9 + 6 + 12) / 22 = 66 / 22 = 3.
 * Damped course biases (damping 5): A (4-3)+(2-3)+(4-3)+(3-3)+(2-3)+(4-3) = 1, / (6+5) = 1/11;
 * B: -1/11; C: 0; X: ((4-3)+(2-3)) / 7 = 0; Y: (0.25-0.25) / 7 = 0.
 * Damped student biases: P1 ((4-3-1/11)+(2-3+1/11)+0) / (3+5) = 0; P2 0;
 * P3 ((2-3-1/11)+(2-3+1/11)+(2-3)) / 8 = -3/8; P4 +3/8.
 *
 * Kin, cosine with IUF off and centring on: P1 centred is (A 1, B -1, C 0), norm √2;
 * T1 centred is (A .75, B -1.25, C -.25, X .75, Y 0), norm √2.75; dot = .75 + 1.25 = 2,
 * w(P1,T1) = 2 / √5.5 ≈ 0.853 > 0. T2 is T1 mirrored: w = -0.853, not kin.
 * P2, P3, P4 have equal values, a zero centred vector, and no kin.
 */
const records: [string, string, string, number][] = [
  ['T1', 'A', '2024-WI', 4],
  ['T1', 'B', '2024-SP', 2],
  ['T1', 'C', '2024-SU', 3],
  ['T1', 'X', '2024-SU', 4],
  ['T1', 'Y', '2024-SU', 3.25],
  ['T2', 'A', '2024-WI', 2],
  ['T2', 'B', '2024-SP', 4],
  ['T2', 'C', '2024-SU', 3],
  ['T2', 'X', '2024-SU', 2],
  ['T2', 'Y', '2024-SU', 2.75],
  ['P1', 'A', '2024-WI', 4],
  ['P1', 'B', '2024-SP', 2],
  ['P1', 'C', '2024-SU', 3],
  ['P1', 'X', '2024-FA', 3.7],
  ['P2', 'A', '2024-WI', 3],
  ['P2', 'B', '2024-SP', 3],
  ['P2', 'C', '2024-SU', 3],
  ['P2', 'X', '2024-FA', 2],
  ['P3', 'A', '2024-WI', 2],
  ['P3', 'B', '2024-SP', 2],
  ['P3', 'C', '2024-SU', 2],
  ['P3', 'Y', '2024-FA', 2],
  ['P4', 'A', '2024-WI', 4],
  ['P4', 'B', '2024-SP', 4],
  ['P4', 'C', '2024-SU', 4],
  ['P4', 'Y', '2024-FA', 4],
];

function input(): BacktestInput {
  const columns: BacktestRecords = {
    students: [],
    courses: [],
    terms: [],
    grades: [],
    satisfaction: [],
  };
  for (const [student, course, term, grade] of records) {
    columns.students.push(student);
    columns.courses.push(course);
    columns.terms.push(termSortKey(term));
    columns.grades.push(grade);
    columns.satisfaction.push(NaN);
  }
  // The original method (mean-centred), which the hand calculation follows.
  const base = { ...MEAN_CENTRED_MODEL_SETTINGS, iuf: false };
  return {
    records: columns,
    scales: { grade: { min: 0, max: 4 }, satisfaction: { min: 1, max: 5 } },
    holdoutKey: termSortKey('2024-FA'),
    configurations: [
      { ...base, minNeighbours: 1, name: 'One kin is enough' },
      // No one has 5 kin here: every estimate falls back to the damped baseline.
      { ...base, minNeighbours: 5, name: 'Five kin' },
    ],
    departments: { A: 'HRU', B: 'HRU', C: 'HRU', X: 'CMP', Y: 'ART' },
  };
}

const grade = (rows: ReturnType<typeof runBacktest>['results'], name: string) =>
  rows.find((r) => r.signal === 'grade' && r.name === name);

describe('a backtest on a hand-made term history', () => {
  const steps: [number, number][] = [];
  const output = runBacktest(input(), (done, total) => steps.push([done, total]));

  it('scores the configurations as worked out by hand', () => {
    // P1: kin T1 alone, p = m_P1 + w (4 - 3.25) / |w| = 3 + 0.75 = 3.75; error |3.75 - 3.7| = 0.05.
    // P2: baseline 3 + 0 + 0 = 3; error 1. P3: 3 - 3/8 + 0 = 2.625; error 0.625. P4: 3.375; 0.625.
    // MAE (0.05 + 1 + 0.625 + 0.625) / 4 = 2.3 / 4 = 0.575;
    // RMSE √((0.0025 + 1 + 0.390625 + 0.390625) / 4) = √0.4459375; coverage 1 of 4 from kin.
    const one = grade(output.results, 'One kin is enough');
    expect(one).toMatchObject({ kind: 'configuration', configuration: 0, n: 4, coverage: 0.25 });
    expect(one?.mae).toBeCloseTo(0.575, 12);
    expect(one?.rmse).toBeCloseTo(Math.sqrt(0.4459375), 12);
    // Every estimate from the baseline: P1 3 (error 0.7), then as above: (0.7 + 1 + 1.25) / 4.
    const five = grade(output.results, 'Five kin');
    expect(five).toMatchObject({ n: 4, coverage: 0 });
    expect(five?.mae).toBeCloseTo(2.95 / 4, 12);
  });

  it('scores the four baselines as worked out by hand', () => {
    // Global mean 3: errors 0.7, 1, 1, 1. Course mean X = (4+2)/2 = 3, Y = (3.25+2.75)/2 = 3: the same.
    expect(grade(output.results, 'Global mean')?.mae).toBeCloseTo(3.7 / 4, 12);
    expect(grade(output.results, 'Course mean')?.mae).toBeCloseTo(3.7 / 4, 12);
    // Student mean: P1 3 (0.7), P2 3 (1), P3 2 (0), P4 4 (0) — better than any configuration here.
    expect(grade(output.results, 'Student mean')?.mae).toBeCloseTo(1.7 / 4, 12);
    // Damped bias: 3, 3, 2.625, 3.375.
    expect(grade(output.results, 'Damped bias')?.mae).toBeCloseTo(2.95 / 4, 12);
  });

  it('splits the same cells by the department of the held-out course', () => {
    const cmp = output.byDepartment.filter((r) => r.department === 'CMP' && r.signal === 'grade');
    const art = output.byDepartment.filter((r) => r.department === 'ART' && r.signal === 'grade');
    // CMP holds P1 and P2: (0.05 + 1) / 2; ART holds P3 and P4: (0.625 + 0.625) / 2.
    expect(cmp.find((r) => r.name === 'One kin is enough')).toMatchObject({ n: 2, coverage: 0.5 });
    expect(cmp.find((r) => r.name === 'One kin is enough')?.mae).toBeCloseTo(0.525, 12);
    expect(art.find((r) => r.name === 'One kin is enough')?.mae).toBeCloseTo(0.625, 12);
    expect(art.find((r) => r.name === 'Student mean')?.mae).toBeCloseTo(0, 12);
    // No held-out record in HRU, and nothing from satisfaction (no survey values at all).
    expect(output.byDepartment.some((r) => r.department === 'HRU')).toBe(false);
    expect(output.byDepartment.some((r) => r.signal === 'satisfaction')).toBe(false);
  });

  it('reports satisfaction with nothing to test, and progress step by step', () => {
    const satisfaction = output.results.filter((r) => r.signal === 'satisfaction');
    expect(satisfaction).toHaveLength(6);
    expect(satisfaction.every((r) => r.n === 0 && r.mae === null)).toBe(true);
    // Two configurations, then two departments (ART, CMP).
    expect(steps).toEqual([
      [1, 4],
      [2, 4],
      [3, 4],
      [4, 4],
    ]);
  });
});
