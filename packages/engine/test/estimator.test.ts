import cosineSimilarity from 'compute-cosine-similarity';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  buildModel,
  DEFAULT_SETTINGS,
  explain,
  predictStudent,
  RecordsInput,
  resolveSettings,
  similarities,
} from '../src';
import { roundSignificant } from '../src/similarity';
import { randomRecords, rng } from './helpers';

type Matrix = (number | null)[][];

const SCALES = { scales: { grade: { min: 0, max: 4 }, satisfaction: { min: 1, max: 5 } } };

/**
 * A plain re-implementation of method.md's estimator over a dense matrix (rows students,
 * columns courses, null = no value): damped baseline, residuals, IUF-weighted residual cosine,
 * shrinkage n / (n + beta), top k by (w, key), prediction around b_aj. Written from the
 * formulas in method.md, loop by loop, without any of the engine's code.
 */
function baseline(R: Matrix, lu: number, lj: number) {
  const cells = R.flatMap((row) => row.filter((x): x is number => x !== null));
  const mu = cells.reduce((a, b) => a + b, 0) / cells.length;
  const bj = R[0].map((_, j) => {
    let s = 0;
    let n = 0;
    for (const row of R) {
      if (row[j] !== null) {
        s += (row[j] as number) - mu;
        n++;
      }
    }
    return n ? s / (n + lj) : 0;
  });
  const bu = R.map((row) => {
    let s = 0;
    let n = 0;
    row.forEach((x, j) => {
      if (x !== null) {
        s += x - mu - bj[j];
        n++;
      }
    });
    return n ? s / (n + lu) : 0;
  });
  return { mu, bj, bu, b: (u: number, j: number) => mu + bu[u] + bj[j] };
}

function iuf(has: boolean[][]): number[] {
  const N = has.filter((r) => r.some(Boolean)).length;
  return has[0].map((_, j) => {
    const n = has.filter((r) => r[j]).length;
    return n ? Math.log(N / n) : 0;
  });
}

/** cos over residual vectors x (null = no value), weights f_j^2; 0 when a norm is 0. */
function residualCosine(x: (number | null)[][], f: number[], a: number, i: number) {
  let num = 0;
  let na = 0;
  let ni = 0;
  let n = 0;
  x[a].forEach((v, j) => {
    if (v !== null) na += f[j] * f[j] * v * v;
  });
  x[i].forEach((v, j) => {
    if (v !== null) ni += f[j] * f[j] * v * v;
  });
  x[a].forEach((v, j) => {
    const w = x[i][j];
    if (v !== null && w !== null) {
      num += f[j] * f[j] * v * w;
      n++;
    }
  });
  return { cos: na > 0 && ni > 0 ? num / (Math.sqrt(na) * Math.sqrt(ni)) : 0, n };
}

function plainPredict(
  R: Matrix,
  E: boolean[][],
  keys: string[],
  a: number,
  j: number,
  o: { lu: number; lj: number; beta: number; k: number; enrolment: boolean },
): number {
  const base = baseline(R, o.lu, o.lj);
  const x = R.map((row, u) => row.map((v, c) => (v === null ? null : v - base.b(u, c))));
  const f = iuf(R.map((row) => row.map((v) => v !== null)));
  const fe = iuf(E);
  const ones = E.map((row) => row.map((e) => (e ? 1 : null)));
  const kin: { i: number; w: number }[] = [];
  for (let i = 0; i < R.length; i++) {
    if (i === a || R[i][j] === null) continue;
    const s = residualCosine(x, f, a, i);
    let w = s.cos;
    let n = s.n;
    if (o.enrolment) {
      const e = residualCosine(ones, fe, a, i);
      w = (s.cos + e.cos) / 2;
      n = Math.max(s.n, e.n);
    }
    w *= n / (n + o.beta);
    if (w > 0) kin.push({ i, w });
  }
  kin.sort((p, q) => q.w - p.w || (keys[p.i] < keys[q.i] ? -1 : 1));
  const top = kin.slice(0, o.k);
  if (top.length < 5) return base.b(a, j);
  let num = 0;
  let den = 0;
  for (const { i, w } of top) {
    num += w * (x[i][j] as number);
    den += Math.abs(w);
  }
  return base.b(a, j) + num / den;
}

function fromMatrix(R: Matrix, S: Matrix, withdrawn: [number, number][] = []): RecordsInput {
  const out = {
    students: [] as string[],
    courses: [] as string[],
    terms: [] as string[],
    grades: [] as (number | null)[],
    satisfaction: [] as (number | null)[],
  };
  R.forEach((row, u) =>
    row.forEach((g, j) => {
      const w = withdrawn.some(([x, y]) => x === u && y === j);
      if (g === null && S[u][j] === null && !w) return;
      out.students.push(`s${u}`);
      out.courses.push(`c${j}`);
      out.terms.push('2024-FA');
      out.grades.push(g);
      out.satisfaction.push(S[u][j]);
    }),
  );
  return out;
}

describe('baseline-centred estimator against a plain re-implementation of method.md', () => {
  it('a hand-checkable fixture: baseline, residuals and one prediction', () => {
    // Three students, two courses. mu = (4 + 2 + 3) / 3 = 3.
    // b_c0 = ((4 - 3) + (2 - 3)) / (2 + 5) = 0; b_c1 = (3 - 3) / (1 + 5) = 0.
    // b_s0 = (4 - 3 - 0) / (1 + 1) = 0.5 with lambda_u = 1; b_s1 = -0.5; b_s2 = 0.
    const R: Matrix = [
      [4, null],
      [2, null],
      [null, 3],
    ];
    const model = buildModel(
      fromMatrix(
        R,
        R.map((r) => r.map(() => null)),
      ),
    );
    const p = predictStudent(model, 's2', ['c0']).predictions[0];
    // s2 has no kin (nothing shared): the baseline mu + b_s2 + b_c0 = 3.
    expect(p.grade.basis).toBe('baseline');
    expect(p.grade.value).toBe(3);
    expect(baseline(R, 1, 5).b(0, 0)).toBe(3.5);
    const p0 = predictStudent(model, 'nobody', ['c0']).predictions[0];
    expect(p0.grade.value).toBe(3);
  });

  it('random universities: every estimate equals the plain computation', () => {
    for (let seed = 1; seed <= 4; seed++) {
      const data = randomRecords(rng(seed), 40, 10, 0.6);
      const R = data.matrix;
      const S: Matrix = R.map((row) => row.map(() => null));
      data.students.forEach((s, r) => {
        S[Number(s.slice(1))][Number(data.courses[r].slice(1))] = (
          data.satisfaction as (number | null)[]
        )[r];
      });
      // Some withdrawals (no grade, no satisfaction) still count as enrolment.
      const withdrawn: [number, number][] = [];
      R.forEach((row, u) =>
        row.forEach((g, j) => {
          if (g === null && (u * 7 + j * 3) % 11 === 0) withdrawn.push([u, j]);
        }),
      );
      const model = buildModel(fromMatrix(R, S, withdrawn), SCALES);
      const E = R.map((row, u) =>
        row.map(
          (g, j) =>
            g !== null || S[u][j] !== null || withdrawn.some(([x, y]) => x === u && y === j),
        ),
      );
      const keys = R.map((_, u) => `s${u}`);
      const settings = { ...DEFAULT_SETTINGS, k: 7, tieDigits: 0 };
      for (let a = 0; a < 40; a += 3) {
        const courses = R[a].map((_, j) => `c${j}`);
        const got = predictStudent(model, `s${a}`, courses, settings).predictions;
        courses.forEach((_, j) => {
          const g = plainPredict(R, E, keys, a, j, {
            lu: 1,
            lj: 5,
            beta: 25,
            k: 7,
            enrolment: false,
          });
          expect(got[j].grade.value).toBeCloseTo(Math.min(4, Math.max(0, g)), 10);
          const s = plainPredict(S, E, keys, a, j, {
            lu: 5,
            lj: 5,
            beta: 25,
            k: 7,
            enrolment: true,
          });
          if (got[j].satisfaction.value !== null) {
            expect(got[j].satisfaction.value).toBeCloseTo(Math.min(5, Math.max(1, s)), 10);
          }
        });
      }
    }
  });
});

/*
 * Source: Y. Koren, "Factor in the neighbors: scalable and accurate collaborative filtering",
 * ACM TKDD 4(1), 2010, section 2 (quoted from memory): baseline estimates
 * b_ui = mu + b_u + b_i with b_i = sum_{u in R(i)} (r_ui - mu) / (lambda_2 + |R(i)|) and
 * b_u = sum_{i in R(u)} (r_ui - mu - b_i) / (lambda_3 + |R(u)|); shrunk similarities
 * s_ij = n_ij / (n_ij + lambda_2) * rho_ij; and the neighbourhood model around the baseline
 * r^_ui = b_ui + sum_{j in S^k(i; u)} s_ij (r_uj - b_uj) / sum_{j in S^k(i; u)} s_ij.
 * Koren writes it item-oriented (neighbours are items the user rated); Kinpath's is the same
 * model with the roles of students and courses exchanged. The check below runs Koren's
 * item-oriented formulas on the transposed matrix (items = students, users = courses) with
 * rho the residual cosine, and compares.
 */
function korenItemOriented(
  Rt: Matrix, // rows: Koren's users (our courses); columns: Koren's items (our students)
  u: number,
  i: number,
  lambdaItem: number, // damping of the item (our student) bias
  lambdaUser: number, // damping of the user (our course) bias
  lambdaSim: number,
  k: number,
  rho: (i: number, j: number) => { rho: number; n: number },
  itemKey: (i: number) => string,
) {
  const cells = Rt.flatMap((r) => r.filter((x): x is number => x !== null));
  const mu = cells.reduce((a, b) => a + b, 0) / cells.length;
  // Koren computes b_i first, then b_u; with the roles exchanged ours computes the course
  // (Koren's user) bias first: b_u^K = sum (r - mu) / (lambda + |R(u)|).
  const bu = Rt.map((row) => {
    const v = row.filter((x): x is number => x !== null);
    return v.length ? v.reduce((s, x) => s + x - mu, 0) / (v.length + lambdaUser) : 0;
  });
  const bi = Rt[0].map((_, it) => {
    let s = 0;
    let n = 0;
    Rt.forEach((row, us) => {
      if (row[it] !== null) {
        s += (row[it] as number) - mu - bu[us];
        n++;
      }
    });
    return n ? s / (n + lambdaItem) : 0;
  });
  const b = (us: number, it: number) => mu + bu[us] + bi[it];
  const S = Rt[u]
    .map((x, j) => ({ j, x }))
    .filter(({ j, x }) => j !== i && x !== null)
    .map(({ j }) => {
      const r = rho(i, j);
      return { j, s: (r.n / (r.n + lambdaSim)) * r.rho };
    })
    .filter((e) => e.s > 0)
    .sort((p, q) => q.s - p.s || (itemKey(p.j) < itemKey(q.j) ? -1 : 1))
    .slice(0, k);
  if (S.length < 5) return b(u, i);
  const num = S.reduce((t, e) => t + e.s * ((Rt[u][e.j] as number) - b(u, e.j)), 0);
  const den = S.reduce((t, e) => t + e.s, 0);
  return b(u, i) + num / den;
}

describe("Koren (2010)'s neighbourhood around a baseline predictor, roles exchanged", () => {
  it('grades on random universities', () => {
    for (let seed = 11; seed <= 13; seed++) {
      const data = randomRecords(rng(seed), 35, 9, 0.6);
      const R = data.matrix;
      const Rt: Matrix = R[0].map((_, j) => R.map((row) => row[j]));
      const model = buildModel({ ...data, satisfaction: undefined }, SCALES);
      const settings = { ...DEFAULT_SETTINGS, k: 6, shrinkage: 25, tieDigits: 0 };
      const base = baseline(R, 1, 5);
      const x = R.map((row, u) => row.map((v, c) => (v === null ? null : v - base.b(u, c))));
      const f = iuf(R.map((row) => row.map((v) => v !== null)));
      const rho = (p: number, q: number) => {
        const r = residualCosine(x, f, p, q);
        return { rho: r.cos, n: r.n };
      };
      for (let a = 0; a < 35; a += 4) {
        const courses = R[a].map((_, j) => `c${j}`);
        const got = predictStudent(model, `s${a}`, courses, settings).predictions;
        courses.forEach((_, j) => {
          const want = korenItemOriented(Rt, j, a, 1, 5, 25, 6, rho, (i) => `s${i}`);
          expect(got[j].grade.value).toBeCloseTo(Math.min(4, Math.max(0, want)), 10);
        });
      }
    }
  });
});

describe('enrolment cosine against compute-cosine-similarity', () => {
  /* Source: the npm package compute-cosine-similarity on IUF-weighted 0/1 enrolment vectors. */
  it('every course with any record counts, W included', () => {
    for (let seed = 21; seed <= 24; seed++) {
      const data = randomRecords(rng(seed), 30, 12, 0.5);
      // Withdrawals: records without any value.
      for (let u = 0; u < 30; u += 4) {
        data.students.push(`s${u}`);
        data.courses.push('c11');
        data.terms.push('2024-FA');
        (data.grades as (number | null)[]).push(null);
        (data.satisfaction as (number | null)[]).push(null);
      }
      const E = Array.from({ length: 30 }, () => new Array<number>(12).fill(0));
      data.students.forEach(
        (s, r) => (E[Number(s.slice(1))][Number(data.courses[r].slice(1))] = 1),
      );
      const N = E.filter((r) => r.some((x) => x)).length;
      const f = E[0].map((_, j) => {
        const n = E.filter((r) => r[j]).length;
        return n ? Math.log(N / n) : 0;
      });
      const model = buildModel(data);
      const settings = { gradeSimilarity: 'enrolment' as const, shrinkage: 0, tieDigits: 0 };
      for (let a = 0; a < 30; a += 5) {
        const got = new Map(
          similarities(model, `s${a}`, { ...settings, minSimilarity: -2 }).map((k) => [
            k.student,
            k.similarity,
          ]),
        );
        for (let i = 0; i < 30; i++) {
          if (i === a) continue;
          const va = E[a].map((e, j) => e * f[j]);
          const vi = E[i].map((e, j) => e * f[j]);
          const na = va.some((v) => v !== 0);
          const ni = vi.some((v) => v !== 0);
          const want = na && ni ? (cosineSimilarity(va, vi) ?? 0) : 0;
          expect(got.get(`s${i}`) ?? 0).toBeCloseTo(want, 12);
        }
      }
    }
  });
});

describe('ranking on rounded similarities', () => {
  it('rounds to 12 significant digits', () => {
    expect(roundSignificant(0.1 + 0.2, 12)).toBe(0.3);
    expect(roundSignificant(-0.999999999999999, 12)).toBe(-1);
    expect(roundSignificant(0.000123456789012345, 12)).toBeCloseTo(0.000123456789012, 18);
    // Near the smallest doubles the scale would overflow; such values are kept as they are.
    expect(roundSignificant(-1e-299, 12)).toBe(-1e-299);
    expect(roundSignificant(5e-324, 12)).toBe(5e-324);
    fc.assert(
      fc.property(fc.double({ min: -1, max: 1, noNaN: true }), (x) => {
        const r = roundSignificant(x, 12);
        expect(Math.abs(r - x)).toBeLessThanOrEqual(Math.abs(x) * 1e-11 + 1e-300);
      }),
    );
  });

  it('clones tie exactly and go to the smaller key', () => {
    // Students z and b have the same records; in any order of computation their similarities
    // to a are mathematically equal, so the smaller key (b) is the single kin.
    const data = randomRecords(rng(5), 20, 8, 0.7);
    const R = data.matrix;
    const rows = (key: string, u: number) =>
      R[u].forEach((g, j) => {
        if (g === null) return;
        data.students.push(key);
        data.courses.push(`c${j}`);
        data.terms.push('2024-FA');
        (data.grades as number[]).push(g);
        (data.satisfaction as (number | null)[]).push(null);
      });
    rows('z', 3);
    rows('b', 3);
    const model = buildModel(data);
    const kin = similarities(model, 's3', {}, 3);
    expect(kin[0].student).toBe('b');
    expect(kin[1].student).toBe('z');
    expect(kin[0].similarity).toBe(kin[1].similarity);
  });
});

describe('explanations of the new estimator', () => {
  it('signed per-course contributions add up to the kin similarities', () => {
    const data = randomRecords(rng(31), 50, 12, 0.6);
    const model = buildModel(data);
    for (const signal of ['grade', 'satisfaction'] as const) {
      const e = explain(model, 's2', 'c3', { minNeighbours: 1 }, signal);
      const total = e.sharedCourses.reduce((t, c) => t + c.contribution, 0);
      expect(total).toBeCloseTo(e.similarityTotal, 9);
    }
  });
  it('settings: defaults as method.md states; pearson needs student-mean centring', () => {
    expect(resolveSettings({})).toMatchObject({
      gradeSimilarity: 'grade',
      satisfactionSimilarity: 'satisfaction+enrolment',
      centring: 'baseline',
      damping: { grade: { student: 1, course: 5 }, satisfaction: { student: 5, course: 5 } },
      shrinkage: 25,
      k: 30,
      minNeighbours: 5,
      tieDigits: 12,
    });
    expect(() => resolveSettings({ similarity: 'pearson' })).toThrow(/centring/);
  });
});
