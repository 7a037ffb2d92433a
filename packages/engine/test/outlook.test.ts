import { describe, expect, it } from 'vitest';
import { outlook } from '../src';
import { rng } from './helpers';

const {
  calibratedQ,
  coverage,
  fitChoice,
  interval,
  objective,
  PENALTY,
  quantile,
  runOutlook,
  studentTerms,
  takeUpTable,
  wape,
  NO_TERM,
  SMOOTHING,
} = outlook;

/** A conditional-logit data set simulated from θ: one choice per situation, fixed seed. */
function simulate(theta: number[], situations: number, alternatives: number, seed: number) {
  const random = rng(seed);
  const d = theta.length;
  const from = new Int32Array(situations + 1);
  const x = new Float64Array(situations * alternatives * d);
  const chosen = new Float64Array(situations * alternatives);
  const v = new Float64Array(alternatives);
  for (let i = 0; i < situations; i++) {
    from[i] = i * alternatives;
    let sum = 0;
    for (let c = 0; c < alternatives; c++) {
      let s = 0;
      for (let j = 0; j < d; j++) {
        // Features of different kinds: continuous, and a binary one like the prerequisite flag.
        const value = j === d - 1 ? (random() < 0.3 ? 1 : 0) : 2 * random() - 1;
        x[(i * alternatives + c) * d + j] = value;
        s += theta[j] * value;
      }
      sum += v[c] = Math.exp(s);
    }
    let r = random() * sum;
    let pick = 0;
    while (pick < alternatives - 1 && r > v[pick]) r -= v[pick++];
    chosen[i * alternatives + pick] = 1;
  }
  from[situations] = situations * alternatives;
  return { features: d, from, x, chosen };
}

describe('conditional logit (McFadden 1974)', () => {
  // McFadden (1974), and common practice for the conditional logit: at the maximum of the
  // log-likelihood, for every feature the sum over observed choices equals the sum of its
  // expectation under π. With the objective mean log-likelihood − PENALTY |θ|² the condition
  // becomes (observed − expected) / N = 2 PENALTY θ.
  it('satisfies the first-order condition at the fitted θ', () => {
    const set = simulate([0.8, -0.5, 1.2, -2], 1500, 6, 11);
    const fit = fitChoice([set], 4);
    const d = 4;
    const observed = new Float64Array(d);
    const expected = new Float64Array(d);
    let N = 0;
    for (let i = 0; i + 1 < set.from.length; i++) {
      const a = set.from[i];
      const b = set.from[i + 1];
      const v: number[] = [];
      for (let c = a; c < b; c++) {
        let s = 0;
        for (let j = 0; j < d; j++) s += fit.theta[j] * set.x[c * d + j];
        v.push(Math.exp(s));
      }
      const sum = v.reduce((p, q) => p + q, 0);
      for (let c = a; c < b; c++) {
        for (let j = 0; j < d; j++) {
          observed[j] += set.chosen[c] * set.x[c * d + j];
          expected[j] += (v[c - a] / sum) * set.x[c * d + j];
        }
        N += set.chosen[c];
      }
    }
    for (let j = 0; j < d; j++) {
      const penalty = 2 * PENALTY * N * fit.theta[j];
      const scale = Math.max(Math.abs(observed[j]), Math.abs(expected[j]), 1);
      expect(Math.abs(observed[j] - expected[j] - penalty) / scale).toBeLessThan(1e-6);
    }
  });

  it('recovers a known θ within 3 standard errors (inverse Hessian)', () => {
    const truth = [1, -0.7, 0.4, -1.5];
    const set = simulate(truth, 4000, 5, 2026);
    const fit = fitChoice([set], 4);
    for (let j = 0; j < truth.length; j++) {
      expect(Number.isFinite(fit.standardErrors[j])).toBe(true);
      expect(Math.abs(fit.theta[j] - truth[j])).toBeLessThan(3 * fit.standardErrors[j]);
    }
  });

  it('gradient agrees with finite differences of the objective', () => {
    const set = simulate([0.5, 0.5, -1], 200, 4, 3);
    const theta = Float64Array.from([0.2, -0.1, 0.3]);
    const at = objective([set], theta);
    for (let j = 0; j < 3; j++) {
      const h = 1e-6;
      const up = Float64Array.from(theta);
      const down = Float64Array.from(theta);
      up[j] += h;
      down[j] -= h;
      const numeric = (objective([set], up).value - objective([set], down).value) / (2 * h);
      expect(at.gradient[j]).toBeCloseTo(numeric, 7);
    }
  });
});

/**
 * A tiny university: 3 students, 3 electives (A 1000-level, B 1000-level, C 2000-level with
 * prerequisite A), one programme, 4 terms a year, entry term 0.
 *
 *   s0: term 0 A (pass), B (fail); term 1 C
 *   s1: term 0 B (pass); term 1 A
 *   s2: term 1 A
 * Offered: term 0 {A, B}, term 1 {A, B, C}; a new elective D (no history) offered in term 2.
 */
function tinyData() {
  const records = [
    // student, course, term, passed
    [0, 0, 0, 1],
    [0, 1, 0, 0],
    [0, 2, 1, 1],
    [1, 1, 0, 1],
    [1, 0, 1, 1],
    [2, 0, 1, 1],
  ];
  return {
    termsPerYear: 4,
    courseCount: 4,
    courseLevel: Int32Array.from([1, 1, 2, 2]),
    courseElective: Uint8Array.from([1, 1, 1, 1]),
    prerequisites: [null, null, { course: 0 }, null],
    programmeCount: 1,
    studentProgramme: Int32Array.from([0, 0, 0]),
    studentEntry: Int32Array.from([0, 0, NO_TERM]),
    recordFrom: Int32Array.from([0, 3, 5, 6]),
    recordCourse: Int32Array.from(records, (r) => r[1]),
    recordTerm: Int32Array.from(records, (r) => r[2]),
    recordPassed: Uint8Array.from(records, (r) => r[3]),
    offerings: new Map([
      [0, Int32Array.from([0, 1])],
      [1, Int32Array.from([0, 1, 2])],
      [2, Int32Array.from([0, 1, 2, 3])],
    ]),
  };
}

describe('take-up rates (method.md, "Take-up rates")', () => {
  it('equal hand counts on a tiny fixture and smooth a course with no history to rbar', () => {
    const data = tinyData();
    const table = takeUpTable(data, studentTerms(data), 2);
    // Hand counts over H(2) = {0, 1}. Term 0: s0, s1 open to A and B: m_A = 2, m_B = 2,
    // n_A = 1 (s0), n_B = 2. Term 1: s0 passed A (closed), B failed (open); s1 passed B;
    // s2 none passed; C needs A, which only s0 passed. Open: A {s1, s2}, B {s0, s2}, C {s0}:
    // m_A = 2, m_B = 2, m_C = 1; n_A = 2 (s1, s2), n_B = 0, n_C = 1 (s0).
    expect([...table.mc]).toEqual([4, 4, 1, 0]);
    expect([...table.nc]).toEqual([3, 2, 1, 0]);
    const rbar = 6 / 9;
    expect(table.rbar).toBeCloseTo(rbar, 15);
    const a = SMOOTHING;
    expect(table.rc[0]).toBeCloseTo((3 + a * rbar) / (4 + a), 15);
    expect(table.rc[2]).toBeCloseTo((1 + a * rbar) / (1 + a), 15);
    // D has no history: exactly rbar.
    expect(table.rc[3]).toBe((0 + a * rbar) / (0 + a));
    expect(table.rc[3]).toBeCloseTo(rbar, 15);
    // Stage: term 0 everyone stage 0; term 1 s0, s1 stage 1, s2 stage 0.
    // A at stage 0: term 0 s0 (n=1), s1 (n=0); term 1 s2 (n=1) → n=2, m=3.
    const K = 10;
    expect(table.nck[0 * K + 0]).toBe(2);
    expect(table.mck[0 * K + 0]).toBe(3);
    // A at stage 1: term 1 s1 (open, enrolled) → n=1, m=1.
    expect(table.nck[0 * K + 1]).toBe(1);
    expect(table.mck[0 * K + 1]).toBe(1);
    expect(table.rck[0 * K + 1]).toBeCloseTo((1 + a * table.rc[0]) / (1 + a), 15);
    // Level × year at term 1: s0, s1 in year 1 (entry 0), s2 in year 0 (entry unknown).
    // Level 2 (C): only s0 open → m = 1, n = 1 in year 1; none in year 0.
    const Y = 7;
    expect(table.mly[2 * Y + 1]).toBe(1);
    expect(table.nly[2 * Y + 1]).toBe(1);
    expect(table.mly[2 * Y + 0]).toBe(0);
    // Level 1 in year 0: term 1 s2 open to A and B (m = 2), enrolled in A (n = 1).
    expect(table.mly[1 * Y + 0]).toBe(2);
    expect(table.nly[1 * Y + 0]).toBe(1);
  });

  it('marks a new elective "no history" in the forecast', () => {
    const data = tinyData();
    const res = runOutlook(data, 2, Int32Array.from([0, 1, 2]));
    const f = res.forecast!;
    expect([...f.courses]).toEqual([0, 1, 2, 3]);
    expect([...f.noHistory]).toEqual([0, 0, 0, 1]);
    expect(f.expected[3]).toBeGreaterThan(0);
  });
});

describe('accuracy figures', () => {
  it('WAPE, coverage and the calibrated q against hand-computed values', () => {
    // WAPE = (|10-12| + |5-4| + |0-4|) / (12+4+4) = 7/20.
    expect(wape([10, 5, 0], [12, 4, 4])).toBeCloseTo(0.35, 15);
    expect(wape([1], [0])).toBeNull();
    // Inside [8, 12]: 12 yes; [4.5, 5.5]: 4 no; [0, 4]: 4 yes (bounds included) → 2/3.
    expect(coverage([8, 4.5, 0], [12, 5.5, 4], [12, 4, 4])).toBeCloseTo(2 / 3, 15);
    // Scores |A-E|/sqrt(max(V,1)): |12-10|/2 = 1 (V=4), |4-5|/1 = 1 (V=0.5 → 1),
    // |4-0|/1 = 4, |9-6|/3 = 1 (V=9), |0-1|/1 = 1. Sorted 1,1,1,1,4: the 80th percentile by
    // Hyndman & Fan's definition 7 sits at position 0.8·4 = 3.2: 1 + 0.2·(4-1) = 1.6.
    const q = calibratedQ([
      { expected: [10, 5, 0], variance: [4, 0.5, 0], actual: [12, 4, 4] },
      { expected: [6, 1], variance: [9, 0.2], actual: [9, 0] },
    ]);
    expect(q).toBeCloseTo(1.6, 15);
    // numpy.percentile([1, 2, 3, 4], 80) = 3.4 (definition 7, from memory of numpy's default).
    expect(quantile([4, 1, 3, 2], 0.8)).toBeCloseTo(3.4, 15);
    const [low, high] = interval(10, 4, 1.6);
    expect(low).toBeCloseTo(6.8, 15);
    expect(high).toBeCloseTo(13.2, 15);
    expect(interval(1, 0.25, 2)[0]).toBe(0);
  });
});
