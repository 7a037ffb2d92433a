import { Matrix, inverse, solve } from 'ml-matrix';

/** The ridge penalty on θ in the objective: mean log-likelihood − PENALTY |θ|² (method.md). */
export const PENALTY = 1e-4;

/**
 * Choice situations of a conditional logit (McFadden 1974): situation i offers the
 * alternatives from[i]..from[i+1], each with `features` values in x and the number of times
 * it was chosen in `chosen` (0 or 1 for a student's electives of one term).
 */
export interface ChoiceSet {
  features: number;
  from: Int32Array;
  /** Features of every alternative, row-major; or, when absent, written on demand by `fill`. */
  x?: Float64Array;
  /** Writes the features of alternatives a..b (one situation) into `out` from 0. */
  fill?: (a: number, b: number, out: Float64Array) => void;
  chosen: Float64Array;
}

/** The features of situation i's alternatives, and the row of its first one in them. */
function featuresOf(set: ChoiceSet, a: number, b: number, scratch: Float64Array): Float64Array {
  if (set.x) return set.x;
  set.fill!(a, b, scratch);
  return scratch;
}

export interface Objective {
  /** Mean log-likelihood per chosen alternative, minus the penalty. */
  value: number;
  gradient: Float64Array;
  /** Row-major d × d. */
  hessian: Float64Array;
  /** Chosen alternatives (the mean's denominator). */
  observations: number;
}

/** Total chosen alternatives over all sets. */
export function observationsOf(sets: readonly ChoiceSet[]): number {
  let n = 0;
  for (const set of sets) for (let i = 0; i < set.chosen.length; i++) n += set.chosen[i];
  return n;
}

/**
 * The penalised mean log-likelihood, its gradient and (when asked) its Hessian:
 * sum_s sum_{c chosen} (V_sc − ln sum_{c'} exp V_sc') / N − PENALTY |θ|².
 */
export function objective(
  sets: readonly ChoiceSet[],
  theta: Float64Array,
  withHessian = true,
): Objective {
  const d = theta.length;
  const gradient = new Float64Array(d);
  const hessian = new Float64Array(d * d);
  const mean = new Float64Array(d);
  const second = new Float64Array(d * d);
  let value = 0;
  let observations = 0;
  let v = new Float64Array(64);
  let scratch = new Float64Array(64 * d);
  for (const set of sets) {
    if (set.features !== d) throw new Error('The choice sets and θ differ in length.');
    const { from, chosen } = set;
    for (let i = 0; i + 1 < from.length; i++) {
      const a = from[i];
      const b = from[i + 1];
      let n = 0;
      for (let c = a; c < b; c++) n += chosen[c];
      if (n === 0 || b === a) continue;
      if (v.length < b - a) v = new Float64Array(2 * (b - a));
      if (scratch.length < (b - a) * d) scratch = new Float64Array(2 * (b - a) * d);
      const x = featuresOf(set, a, b, scratch);
      // Rows of x: absolute with stored features, from the situation's first when filled.
      const base = set.x ? 0 : a;
      let max = -Infinity;
      for (let c = a; c < b; c++) {
        let s = 0;
        for (let j = 0; j < d; j++) s += theta[j] * x[(c - base) * d + j];
        v[c - a] = s;
        if (s > max) max = s;
      }
      let sum = 0;
      for (let c = a; c < b; c++) sum += v[c - a] = Math.exp(v[c - a] - max);
      const lse = max + Math.log(sum);
      mean.fill(0);
      if (withHessian) second.fill(0);
      for (let c = a; c < b; c++) {
        const pi = v[c - a] / sum;
        const o = (c - base) * d;
        if (chosen[c] > 0) {
          let s = 0;
          for (let j = 0; j < d; j++) {
            s += theta[j] * x[o + j];
            gradient[j] += chosen[c] * x[o + j];
          }
          value += chosen[c] * (s - lse);
        }
        for (let j = 0; j < d; j++) {
          const xj = pi * x[o + j];
          mean[j] += xj;
          if (withHessian) for (let l = 0; l <= j; l++) second[j * d + l] += xj * x[o + l];
        }
      }
      for (let j = 0; j < d; j++) {
        gradient[j] -= n * mean[j];
        if (withHessian) {
          for (let l = 0; l <= j; l++)
            hessian[j * d + l] -= n * (second[j * d + l] - mean[j] * mean[l]);
        }
      }
      observations += n;
    }
  }
  const N = Math.max(1, observations);
  let norm = 0;
  for (let j = 0; j < d; j++) norm += theta[j] * theta[j];
  value = value / N - PENALTY * norm;
  for (let j = 0; j < d; j++) {
    gradient[j] = gradient[j] / N - 2 * PENALTY * theta[j];
    if (withHessian) {
      for (let l = 0; l <= j; l++) {
        const h = hessian[j * d + l] / N - (j === l ? 2 * PENALTY : 0);
        hessian[j * d + l] = h;
        hessian[l * d + j] = h;
      }
    }
  }
  return { value, gradient, hessian, observations };
}

export interface ChoiceFit {
  theta: Float64Array;
  value: number;
  iterations: number;
  observations: number;
  /**
   * Standard errors: square roots of the diagonal of the inverse of the total curvature
   * N × (−Hessian of the mean objective), the observed information of the penalised fit.
   */
  standardErrors: Float64Array;
  /** Largest |gradient| component at θ. */
  gradientNorm: number;
}

/**
 * Newton's method with step halving from θ0 (default: the first feature 1, the rest 0),
 * until the largest gradient component is below `tolerance`.
 */
export function fitChoice(
  sets: readonly ChoiceSet[],
  features: number,
  options: { start?: Float64Array; tolerance?: number; maxIterations?: number } = {},
): ChoiceFit {
  const tolerance = options.tolerance ?? 1e-11;
  const maxIterations = options.maxIterations ?? 100;
  let theta = options.start ? Float64Array.from(options.start) : new Float64Array(features);
  if (!options.start && features > 0) theta[0] = 1;
  let current = objective(sets, theta);
  let iterations = 0;
  const largest = (g: Float64Array) => g.reduce((m, x) => Math.max(m, Math.abs(x)), 0);
  while (iterations < maxIterations && largest(current.gradient) > tolerance) {
    iterations++;
    const negH = new Matrix(features, features);
    for (let j = 0; j < features; j++) {
      for (let l = 0; l < features; l++) negH.set(j, l, -current.hessian[j * features + l]);
    }
    const step = solve(negH, Matrix.columnVector(Array.from(current.gradient))).getColumn(0);
    // The Newton decrement g·step: below rounding, the objective can no longer rise.
    let decrement = 0;
    for (let j = 0; j < features; j++) decrement += current.gradient[j] * step[j];
    if (decrement < 1e-15) break;
    let t = 1;
    let next: Objective | null = null;
    let candidate = theta;
    for (let halving = 0; halving < 40; halving++) {
      candidate = Float64Array.from(theta, (x, j) => x + t * step[j]);
      const trial = objective(sets, candidate);
      if (trial.value >= current.value - 1e-15 * Math.abs(current.value)) {
        next = trial;
        break;
      }
      t /= 2;
    }
    if (!next) break;
    const moved = step.reduce((m, x) => Math.max(m, Math.abs(t * x)), 0);
    const gain = next.value - current.value;
    theta = candidate;
    current = next;
    if (gain < 1e-15 || moved < 1e-14) break;
  }
  const info = new Matrix(features, features);
  const N = Math.max(1, current.observations);
  for (let j = 0; j < features; j++) {
    for (let l = 0; l < features; l++) info.set(j, l, -N * current.hessian[j * features + l]);
  }
  let standardErrors = new Float64Array(features).fill(NaN);
  try {
    const cov = inverse(info);
    standardErrors = Float64Array.from({ length: features }, (_, j) =>
      Math.sqrt(Math.max(0, cov.get(j, j))),
    );
  } catch {
    // A singular curvature leaves the standard errors unknown; θ itself is still the fit.
  }
  return {
    theta,
    value: current.value,
    iterations,
    observations: current.observations,
    standardErrors,
    gradientNorm: largest(current.gradient),
  };
}

/** Choice probabilities of one situation: softmax of θ·x over its alternatives. */
export function choiceProbabilities(
  set: ChoiceSet,
  situation: number,
  theta: Float64Array,
): Float64Array {
  const d = set.features;
  const a = set.from[situation];
  const b = set.from[situation + 1];
  const out = new Float64Array(b - a);
  const x = featuresOf(set, a, b, new Float64Array((b - a) * d));
  const base = set.x ? 0 : a;
  let max = -Infinity;
  for (let c = a; c < b; c++) {
    let s = 0;
    for (let j = 0; j < d; j++) s += theta[j] * x[(c - base) * d + j];
    out[c - a] = s;
    if (s > max) max = s;
  }
  let sum = 0;
  for (let i = 0; i < out.length; i++) sum += out[i] = Math.exp(out[i] - max);
  for (let i = 0; i < out.length; i++) out[i] /= sum;
  return out;
}
