import { FORECAST_Z80 } from '@kinpath/contracts';
import { choiceProbabilities, forecastDemand, interval, wape, Z80 } from '@kinpath/engine';
import { ForbiddenException } from '@nestjs/common';
import { describe, expect, it } from 'vitest';
import {
  forecastFlag,
  neutraliseCell,
  studentKey,
  toCsv,
  utilisation,
  yearOfStudy,
} from './forecast-rules';
import { scopedDepartment } from './forecasts.service';

describe('demand forecast arithmetic on a hand-made cohort', () => {
  // Three students, two electives A and B, beta = 0.05.
  //
  // s1: load 1, fits A 60, B 40. softmax(0.05 * fit): e^3 / (e^3 + e^2) = 1 / (1 + e^-1)
  //     p(A) = 0.7310585786, p(B) = 0.2689414214 (each below 1, so the cap does nothing).
  // s2: load 2, fits A 50, B 50. softmax 1/2 each, times load 2 = 1, capped at 1: p = 1, 1.
  // s3: load 1, only A eligible (fit 70): p(A) = 1.
  //
  // E(A) = 0.7310585786 + 1 + 1 = 2.7310585786
  // E(B) = 0.2689414214 + 1     = 1.2689414214
  // var(A) = 0.7311 * 0.2689 + 1 * 0 + 1 * 0 = 0.1966119332; var(B) = the same.
  // 80 % half-width = 1.2816 * sqrt(0.1966119332) = 1.2816 * 0.4434094 = 0.5682735408
  // A: 2.1627850378 .. 3.2993321195;  B: 0.7006678805 .. 1.8372149622
  const cohort = [
    {
      load: 1,
      electives: [
        { course: 'A', fit: 60 },
        { course: 'B', fit: 40 },
      ],
    },
    {
      load: 2,
      electives: [
        { course: 'A', fit: 50 },
        { course: 'B', fit: 50 },
      ],
    },
    { load: 1, electives: [{ course: 'A', fit: 70 }] },
  ];

  it('gives each student capped softmax choice probabilities', () => {
    const p1 = choiceProbabilities([60, 40], 1, 0.05);
    expect(p1[0]).toBeCloseTo(0.7310585786, 9);
    expect(p1[1]).toBeCloseTo(0.2689414214, 9);
    expect([...choiceProbabilities([50, 50], 2, 0.05)]).toEqual([1, 1]);
    // A missing fit (neither signal predicted) gets no share.
    expect([...choiceProbabilities([NaN, 30], 1, 0.05)]).toEqual([0, 1]);
  });

  it('sums expected demand and variance per elective, with the 80 % interval', () => {
    const [a, b] = forecastDemand(cohort, 0.05);
    expect(a.course).toBe('A');
    expect(a.expected).toBeCloseTo(2.7310585786, 9);
    expect(a.variance).toBeCloseTo(0.1966119332, 9);
    expect(a.low).toBeCloseTo(2.1627850378, 9);
    expect(a.high).toBeCloseTo(3.2993321195, 9);
    expect(b.course).toBe('B');
    expect(b.expected).toBeCloseTo(1.2689414214, 9);
    expect(b.variance).toBeCloseTo(0.1966119332, 9);
    expect(b.low).toBeCloseTo(0.7006678805, 9);
    expect(b.high).toBeCloseTo(1.8372149622, 9);
  });

  it('uses 1.2816, the two-sided 80 % standard normal quantile (standard normal table)', () => {
    // P(|Z| <= 1.2816) = 0.80: Phi(1.2816) = 0.90 in the standard normal table.
    expect(Z80).toBe(1.2816);
    expect(FORECAST_Z80).toBe(Z80);
    // E = 10, variance 4: 10 ± 1.2816 * 2 = 7.4368 .. 12.5632.
    const { low, high } = interval(10, 4);
    expect(low).toBeCloseTo(7.4368, 12);
    expect(high).toBeCloseTo(12.5632, 12);
    // The low end never goes below zero students.
    expect(interval(0.5, 4).low).toBe(0);
  });

  it('computes WAPE as sum |E - A| / sum A', () => {
    // |12 - 10| + |5 - 10| = 7 over 20 enrolled = 0.35.
    expect(wape([12, 5], [10, 10])).toBeCloseTo(0.35, 12);
    expect(wape([1], [0])).toBeNull();
  });
});

describe('flags', () => {
  it('calls an elective over-subscribed only when the whole interval is above the seats', () => {
    expect(forecastFlag(40, 31, 30, 10)).toBe('over_subscribed');
    expect(forecastFlag(40, 30, 30, 10)).toBe('balanced');
  });
  it('calls an elective at risk below the threshold the head sets', () => {
    expect(forecastFlag(9.9, 5, 30, 10)).toBe('at_risk');
    expect(forecastFlag(10, 5, 30, 10)).toBe('balanced');
    expect(forecastFlag(14, 8, 30, 15)).toBe('at_risk');
  });
  it('states utilisation against the seats', () => {
    expect(utilisation(15, 30)).toBe(0.5);
    expect(utilisation(3, 0)).toBeNull();
  });
});

describe('CSV export', () => {
  it('neutralises cells a spreadsheet would run as formulas', () => {
    expect(neutraliseCell('=HYPERLINK("http://x.example","y")')).toBe(
      `'=HYPERLINK("http://x.example","y")`,
    );
    expect(neutraliseCell('+1')).toBe("'+1");
    expect(neutraliseCell('-2+3')).toBe("'-2+3");
    expect(neutraliseCell('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(neutraliseCell('Data Structures')).toBe('Data Structures');
    expect(neutraliseCell('12.5')).toBe('12.5');
  });
  it('quotes after neutralising', () => {
    expect(toCsv(['a', 'b'], [['=1+2', 'x, "y"']])).toBe('a,b\r\n\'=1+2,"x, ""y"""\r\n');
  });
});

describe('department scope', () => {
  const head = { role: 'department_head' as const, department: 'CMP' };
  it('keeps a head to their own department and refuses another with 403', () => {
    expect(scopedDepartment(head, undefined)).toBe('CMP');
    expect(scopedDepartment(head, 'cmp')).toBe('CMP');
    expect(() => scopedDepartment(head, 'MTH')).toThrow(ForbiddenException);
  });
  it('lets registrar staff see all departments or filter', () => {
    const registrar = { role: 'registrar' as const, department: null };
    expect(scopedDepartment(registrar, undefined)).toBeNull();
    expect(scopedDepartment(registrar, 'mth')).toBe('MTH');
  });
});

describe('other rules', () => {
  it('counts years of study from the entry term', () => {
    expect(yearOfStudy('2025-FA', '2025-FA')).toBe(1);
    expect(yearOfStudy('2025-FA', '2026-SP')).toBe(1);
    expect(yearOfStudy('2025-FA', '2026-FA')).toBe(2);
    expect(yearOfStudy(null, '2026-FA')).toBeNull();
  });
  it('stores a key derived from the pseudonym, never the pseudonym itself', () => {
    const pseudonym = 'a'.repeat(64);
    expect(studentKey(pseudonym)).toMatch(/^[0-9a-f]{32}$/);
    expect(pseudonym).not.toContain(studentKey(pseudonym));
  });
});
