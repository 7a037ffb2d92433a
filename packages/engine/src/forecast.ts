/**
 * Demand outlook arithmetic (method.md, "Demand forecast"): pure functions over fit scores, so
 * the server can gather eligibility and loads from its tables and reuse the numbers here.
 */

/** z for a two-sided 80 % interval. */
export const Z80 = 1.2816;

/**
 * Choice probabilities of one student over their eligible electives:
 * p_c = min(1, load * softmax(beta * fit)_c). Non-finite fits get probability 0.
 */
export function choiceProbabilities(
  fits: ArrayLike<number>,
  load: number,
  beta: number,
): Float64Array {
  const n = fits.length;
  const p = new Float64Array(n);
  let max = -Infinity;
  for (let c = 0; c < n; c++) if (Number.isFinite(fits[c]) && fits[c] > max) max = fits[c];
  if (max === -Infinity) return p;
  let sum = 0;
  for (let c = 0; c < n; c++) {
    // Subtracting the largest fit keeps exp() in range without changing the softmax.
    const e = Number.isFinite(fits[c]) ? Math.exp(beta * (fits[c] - max)) : 0;
    p[c] = e;
    sum += e;
  }
  for (let c = 0; c < n; c++) p[c] = Math.min(1, (load * p[c]) / sum);
  return p;
}

/** Expected electives per term for a student: the median of their peers' counts, else 1. */
export function expectedLoad(peerCounts: readonly number[]): number {
  if (peerCounts.length === 0) return 1;
  const s = [...peerCounts].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

export interface ForecastStudent {
  /** Expected number of electives this term (e_s). */
  load: number;
  /** Eligible offered electives with their fit scores. */
  electives: readonly { course: string; fit: number }[];
}

export interface CourseDemand {
  course: string;
  expected: number;
  variance: number;
  /** 80 % interval, E ± 1.2816 sqrt(variance); the lower end is floored at 0. */
  low: number;
  high: number;
}

/** Expected demand, its variance and an 80 % interval per course, in first-seen order. */
export function forecastDemand(students: readonly ForecastStudent[], beta: number): CourseDemand[] {
  const idx = new Map<string, number>();
  const exp: number[] = [];
  const vars: number[] = [];
  const names: string[] = [];
  for (const s of students) {
    const p = choiceProbabilities(
      s.electives.map((e) => e.fit),
      s.load,
      beta,
    );
    s.electives.forEach((e, c) => {
      let i = idx.get(e.course);
      if (i === undefined) {
        i = names.length;
        idx.set(e.course, i);
        names.push(e.course);
        exp.push(0);
        vars.push(0);
      }
      exp[i] += p[c];
      vars[i] += p[c] * (1 - p[c]);
    });
  }
  return names.map((course, i) => ({
    course,
    expected: exp[i],
    variance: vars[i],
    ...interval(exp[i], vars[i]),
  }));
}

export function interval(expected: number, variance: number): { low: number; high: number } {
  const h = Z80 * Math.sqrt(variance);
  return { low: Math.max(0, expected - h), high: expected + h };
}

/** WAPE = sum |E_c - A_c| / sum A_c; null when nothing was enrolled. */
export function wape(forecast: ArrayLike<number>, actual: ArrayLike<number>): number | null {
  if (forecast.length !== actual.length)
    throw new Error('wape: forecast and actual differ in length');
  let num = 0;
  let den = 0;
  for (let c = 0; c < actual.length; c++) {
    num += Math.abs(forecast[c] - actual[c]);
    den += actual[c];
  }
  return den > 0 ? num / den : null;
}

/** The beta grid tried by calibrateBeta (fit is 0-100, so useful betas are small). */
export const BETA_GRID: readonly number[] = Array.from({ length: 41 }, (_, i) => i * 0.005);

/**
 * Calibrate beta on a completed term: the grid value whose forecast has the lowest WAPE against
 * what was enrolled (ties: the smaller beta).
 */
export function calibrateBeta(
  students: readonly ForecastStudent[],
  actual: ReadonlyMap<string, number>,
  grid: readonly number[] = BETA_GRID,
): { beta: number; wape: number | null } {
  let best = { beta: grid[0] ?? 0, wape: null as number | null };
  for (const beta of grid) {
    const f = forecastDemand(students, beta);
    const courses = new Set([...f.map((d) => d.course), ...actual.keys()]);
    const byCourse = new Map(f.map((d) => [d.course, d.expected]));
    const fc: number[] = [];
    const ac: number[] = [];
    for (const c of courses) {
      fc.push(byCourse.get(c) ?? 0);
      ac.push(actual.get(c) ?? 0);
    }
    const w = wape(fc, ac);
    if (w !== null && (best.wape === null || w < best.wape)) best = { beta, wape: w };
  }
  return best;
}
