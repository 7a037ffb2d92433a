import { resolveSettings, scorerFor } from './api';
import { buildTable, Model, modelFromTable, RecordTable } from './model';
import { likelyRange, RangeTable, rangeTable, residualCells } from './ranges';
import { baselineValue, BASIS_NEIGHBOURS, DEFAULT_SCALES } from './score';
import {
  BuildOptions,
  Confidence,
  RecordsInput,
  Scale,
  Settings,
  SettingsInput,
  Signal,
  SIGNALS,
} from './types';

/** A backtest plan: a held-out term (default in the product) or random k-fold. */
export type EvaluationPlan = { holdoutTerm: string } | { folds: number; seed?: number };

export interface Metrics {
  /** Test cells. */
  n: number;
  /** null when there are no test cells. */
  mae: number | null;
  rmse: number | null;
  /** Share of test cells predicted from kin (configurations) or from the baseline's own data. */
  coverage: number | null;
}

/** How the likely ranges of a configuration did on the held-out outcomes. */
export interface RangeMetrics {
  /** The term whose residuals made the ranges (the one before the holdout). */
  calibrationTerm: string;
  /** Share of held-out outcomes inside their 80 % range. */
  coverage: number | null;
  /** Mean width of the ranges. */
  meanWidth: number | null;
  byConfidence: Record<Confidence, { n: number; coverage: number | null }>;
}

/** A configuration's MAE margin over the best baseline (positive: better), with a bootstrap interval. */
export interface Margin {
  /** The baseline with the lowest MAE. */
  baseline: keyof SignalEvaluation['baselines'];
  mae: number;
  /** 95 % percentile interval from resampling students (1,000 resamples, seeded). */
  low: number;
  high: number;
}

export interface SignalEvaluation {
  configurations: (Metrics & {
    settings: Settings;
    margin: Margin | null;
    ranges: RangeMetrics | null;
  })[];
  baselines: {
    globalMean: Metrics;
    courseMean: Metrics;
    studentMean: Metrics;
    dampedBias: Metrics;
  };
}

export interface EvaluationReport {
  plan: EvaluationPlan;
  signals: Partial<Record<Signal, SignalEvaluation>>;
}

/** Students need this many earlier records to be tested in a time holdout. */
export const HOLDOUT_MIN_EARLIER_RECORDS = 3;

class Acc {
  n = 0;
  abs = 0;
  sq = 0;
  own = 0;
  add(pred: number, truth: number, own: boolean): void {
    const e = pred - truth;
    this.n++;
    this.abs += Math.abs(e);
    this.sq += e * e;
    if (own) this.own++;
  }
  metrics(): Metrics {
    if (this.n === 0) return { n: 0, mae: null, rmse: null, coverage: null };
    return {
      n: this.n,
      mae: this.abs / this.n,
      rmse: Math.sqrt(this.sq / this.n),
      coverage: this.own / this.n,
    };
  }
}

/** Per test cell of one configuration: student, absolute error and range outcome. */
class CellLog {
  student: number[] = [];
  err: number[] = [];
  inside: number[] = []; // 1 inside, 0 outside, -1 no range
  conf: number[] = []; // 0 low, 1 medium, 2 high
  width: number[] = [];
  add(
    student: number,
    err: number,
    truth: number,
    range: { low: number; high: number; confidence: Confidence } | null,
  ): void {
    this.student.push(student);
    this.err.push(err);
    if (range) {
      this.inside.push(truth >= range.low && truth <= range.high ? 1 : 0);
      this.conf.push(range.confidence === 'high' ? 2 : range.confidence === 'medium' ? 1 : 0);
      this.width.push(range.high - range.low);
    } else {
      this.inside.push(-1);
      this.conf.push(0);
      this.width.push(NaN);
    }
  }

  ranges(term: string): RangeMetrics {
    const levels: Confidence[] = ['low', 'medium', 'high'];
    const by = levels.map(() => ({ n: 0, in: 0 }));
    let n = 0;
    let inside = 0;
    let width = 0;
    for (let x = 0; x < this.inside.length; x++) {
      if (this.inside[x] < 0) continue;
      n++;
      inside += this.inside[x];
      width += this.width[x];
      by[this.conf[x]].n++;
      by[this.conf[x]].in += this.inside[x];
    }
    const byConfidence = {} as RangeMetrics['byConfidence'];
    levels.forEach((l, i) => {
      byConfidence[l] = { n: by[i].n, coverage: by[i].n ? by[i].in / by[i].n : null };
    });
    return {
      calibrationTerm: term,
      coverage: n ? inside / n : null,
      meanWidth: n ? width / n : null,
      byConfidence,
    };
  }

  /** MAE margin over the best baseline; the interval resamples students (seeded). */
  margin(
    base: Record<keyof SignalEvaluation['baselines'], number[]>,
    resamples: number,
  ): Margin | null {
    const n = this.err.length;
    if (n === 0) return null;
    const mean = (a: number[]) => a.reduce((t, x) => t + x, 0) / a.length;
    let best: keyof SignalEvaluation['baselines'] = 'dampedBias';
    let bestMae = Infinity;
    for (const k of ['globalMean', 'courseMean', 'studentMean', 'dampedBias'] as const) {
      const m = mean(base[k]);
      if (m < bestMae) {
        bestMae = m;
        best = k;
      }
    }
    const b = base[best];
    // Per student: summed baseline error minus summed configuration error, and cell count.
    const idx = new Map<number, number>();
    const diff: number[] = [];
    const cnt: number[] = [];
    for (let x = 0; x < n; x++) {
      let i = idx.get(this.student[x]);
      if (i === undefined) {
        i = diff.length;
        idx.set(this.student[x], i);
        diff.push(0);
        cnt.push(0);
      }
      diff[i] += b[x] - this.err[x];
      cnt[i]++;
    }
    const mae = bestMae - mean(this.err);
    const rnd = seededRandom(20240917);
    const U = diff.length;
    const stats = new Float64Array(resamples);
    for (let r = 0; r < resamples; r++) {
      let d = 0;
      let c = 0;
      for (let u = 0; u < U; u++) {
        const i = Math.floor(rnd() * U);
        d += diff[i];
        c += cnt[i];
      }
      stats[r] = d / c;
    }
    stats.sort();
    const q = (p: number) =>
      stats[Math.min(resamples - 1, Math.max(0, Math.round(p * (resamples - 1))))];
    return {
      baseline: best,
      mae,
      low: resamples ? q(0.025) : mae,
      high: resamples ? q(0.975) : mae,
    };
  }
}

/**
 * Likely-range tables per signal from a backtest on `term` (trained on the terms before it):
 * the residuals of up to `maxStudents` held-out students (every m-th, so the choice is
 * reproducible).
 */
export function calibrateRanges(
  input: RecordsInput | RecordTable,
  term: string,
  settings: SettingsInput,
  options: BuildOptions & { signals?: readonly Signal[]; maxStudents?: number } = {},
): Partial<Record<Signal, RangeTable>> {
  const table = 'studentKeys' in input ? input : buildTable(input, options);
  const st = resolveSettings(settings);
  const [fold] = holdoutFolds(table, term);
  const model = modelFromTable(table, fold.train);
  const out: Partial<Record<Signal, RangeTable>> = {};
  const max = options.maxStudents ?? 3000;
  for (const s of options.signals ?? SIGNALS) {
    let test = fold.tests[s];
    const students = new Set(test.student).size;
    if (students > max) {
      const step = Math.ceil(students / max);
      const keep: number[] = [];
      let seen = -1;
      let ord = -1;
      for (let x = 0; x < test.student.length; x++) {
        if (test.student[x] !== seen) {
          seen = test.student[x];
          ord++;
        }
        if (ord % step === 0) keep.push(x);
      }
      test = {
        student: Int32Array.from(keep, (x) => test.student[x]),
        course: Int32Array.from(keep, (x) => test.course[x]),
        truth: Float64Array.from(keep, (x) => test.truth[x]),
      };
    }
    if (test.student.length === 0 || model.signals[s].globalMean !== model.signals[s].globalMean) {
      continue;
    }
    const cells = residualCells(model, s, test, st);
    out[s] = rangeTable(cells, s, term, table.scales[s] ?? DEFAULT_SCALES[s]);
  }
  return out;
}

interface Fold {
  train: Uint8Array;
  /** Test cells per signal: student, course, truth (grouped by student). */
  tests: Record<Signal, { student: Int32Array; course: Int32Array; truth: Float64Array }>;
}

function clamp(v: number, scale: Scale | undefined): number {
  if (!scale) return v;
  return v < scale.min ? scale.min : v > scale.max ? scale.max : v;
}

/** Latest value per (student, course) for each signal within the masked records. */
function cellsOf(table: RecordTable, mask: Uint8Array): Model {
  return modelFromTable(table, mask);
}

function holdoutFolds(table: RecordTable, term: string): Fold[] {
  const T = table.termKeys.indexOf(term);
  if (T < 0) throw new Error(`holdout term ${JSON.stringify(term)} has no records`);
  const R = table.student.length;
  const train = new Uint8Array(R);
  const testMask = new Uint8Array(R);
  const earlier = new Int32Array(table.studentKeys.length);
  for (let r = 0; r < R; r++) {
    if (table.term[r] < T) {
      train[r] = 1;
      earlier[table.student[r]]++;
    } else if (table.term[r] === T) testMask[r] = 1;
  }
  const truth = cellsOf(table, testMask);
  const trainModel = cellsOf(table, train);
  const tests = {} as Fold['tests'];
  for (const s of SIGNALS) {
    const d = truth.signals[s];
    const td = trainModel.signals[s];
    const st: number[] = [];
    const co: number[] = [];
    const tv: number[] = [];
    for (let a = 0; a < table.studentKeys.length; a++) {
      if (earlier[a] < HOLDOUT_MIN_EARLIER_RECORDS) continue;
      for (let p = d.rowPtr[a]; p < d.rowPtr[a + 1]; p++) {
        const j = d.rowCourse[p];
        // A retake of a course already valued in training is not a new elective: skip it.
        let retake = false;
        for (let q = td.rowPtr[a]; q < td.rowPtr[a + 1]; q++)
          if (td.rowCourse[q] === j) retake = true;
        if (retake) continue;
        st.push(a);
        co.push(j);
        tv.push(d.rowValue[p]);
      }
    }
    tests[s] = {
      student: Int32Array.from(st),
      course: Int32Array.from(co),
      truth: Float64Array.from(tv),
    };
  }
  return [{ train, tests }];
}

/** mulberry32: a small seeded generator, enough for shuffling folds reproducibly. */
export function seededRandom(seed: number): () => number {
  let x = seed >>> 0;
  return () => {
    x = (x + 0x6d2b79f5) >>> 0;
    let t = x;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function kFolds(table: RecordTable, K: number, seed: number): Fold[] {
  if (!Number.isInteger(K) || K < 2)
    throw new Error(`folds must be an integer of at least 2, got ${K}`);
  const C = table.courseKeys.length;
  const R = table.student.length;
  // Cells are (student, course) pairs; every attempt of a cell goes to the same fold so an
  // earlier attempt cannot leak the answer.
  const keys = new Float64Array(R);
  for (let r = 0; r < R; r++) keys[r] = table.student[r] * C + table.course[r];
  const uniq = Float64Array.from(new Set(keys)).sort();
  const rnd = seededRandom(seed);
  const perm = Int32Array.from({ length: uniq.length }, (_, i) => i);
  for (let i = perm.length - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    const t = perm[i];
    perm[i] = perm[j];
    perm[j] = t;
  }
  const foldOfCell = new Int32Array(uniq.length);
  for (let p = 0; p < perm.length; p++) foldOfCell[perm[p]] = p % K;
  const foldOfRecord = new Int32Array(R);
  for (let r = 0; r < R; r++) {
    let lo = 0;
    let hi = uniq.length - 1;
    while (lo < hi) {
      const m = (lo + hi) >> 1;
      if (uniq[m] < keys[r]) lo = m + 1;
      else hi = m;
    }
    foldOfRecord[r] = foldOfCell[lo];
  }
  const full = cellsOf(table, new Uint8Array(R).fill(1));
  const folds: Fold[] = [];
  for (let f = 0; f < K; f++) {
    const train = new Uint8Array(R);
    for (let r = 0; r < R; r++) train[r] = foldOfRecord[r] === f ? 0 : 1;
    const tests = {} as Fold['tests'];
    for (const s of SIGNALS) {
      const d = full.signals[s];
      const st: number[] = [];
      const co: number[] = [];
      const tv: number[] = [];
      for (let a = 0; a < table.studentKeys.length; a++) {
        for (let p = d.rowPtr[a]; p < d.rowPtr[a + 1]; p++) {
          const j = d.rowCourse[p];
          let lo = 0;
          let hi = uniq.length - 1;
          const key = a * C + j;
          while (lo < hi) {
            const m = (lo + hi) >> 1;
            if (uniq[m] < key) lo = m + 1;
            else hi = m;
          }
          if (foldOfCell[lo] !== f) continue;
          st.push(a);
          co.push(j);
          tv.push(d.rowValue[p]);
        }
      }
      tests[s] = {
        student: Int32Array.from(st),
        course: Int32Array.from(co),
        truth: Float64Array.from(tv),
      };
    }
    folds.push({ train, tests });
  }
  return folds;
}

/**
 * Backtest: hide outcomes whose truth is known, predict them, compare. Each configuration
 * predicts every test cell (kin when enough contribute, else the damped baseline, else the
 * global mean); coverage is the share predicted from kin. Baselines: global mean, course mean
 * and student mean (each falling back to the global mean) and the damped bias model.
 */
export function evaluate(
  input: RecordsInput | RecordTable,
  plan: EvaluationPlan,
  configurations: readonly SettingsInput[] = [{}],
  options: BuildOptions & {
    signals?: readonly Signal[];
    /** Likely ranges from the term before the holdout, and their coverage (time holdout only). */
    ranges?: boolean;
    /** Resamples for the margin's interval; 0 leaves margins out. */
    bootstrap?: number;
  } = {},
): EvaluationReport {
  const table = 'studentKeys' in input ? input : buildTable(input, options);
  const folds =
    'holdoutTerm' in plan
      ? holdoutFolds(table, plan.holdoutTerm)
      : kFolds(table, plan.folds, plan.seed ?? 1);
  const settings = configurations.map((c) => resolveSettings(c));
  const signals = options.signals ?? SIGNALS;
  const tables: (Partial<Record<Signal, RangeTable>> | null)[] = settings.map(() => null);
  let calibrationTerm: string | null = null;
  if (options.ranges && 'holdoutTerm' in plan) {
    const T = table.termKeys.indexOf(plan.holdoutTerm);
    if (T >= 2) {
      calibrationTerm = table.termKeys[T - 1];
      settings.forEach((st, ci) => {
        tables[ci] = calibrateRanges(table, calibrationTerm as string, st, { signals });
      });
    }
  }
  const cells = {} as Record<Signal, CellLog[]>;
  for (const s of signals) cells[s] = settings.map(() => new CellLog());
  const baseErr = {} as Record<Signal, Record<keyof SignalEvaluation['baselines'], number[]>>;
  for (const s of signals)
    baseErr[s] = { globalMean: [], courseMean: [], studentMean: [], dampedBias: [] };
  const acc = {} as Record<Signal, { cfg: Acc[]; g: Acc; c: Acc; s: Acc; b: Acc }>;
  for (const s of signals) {
    acc[s] = {
      cfg: settings.map(() => new Acc()),
      g: new Acc(),
      c: new Acc(),
      s: new Acc(),
      b: new Acc(),
    };
  }
  for (const fold of folds) {
    const model = modelFromTable(table, fold.train);
    const scorer = scorerFor(model);
    for (const s of signals) {
      const d = model.signals[s];
      const scale = table.scales[s];
      const test = fold.tests[s];
      const A = acc[s];
      const mu = d.globalMean;
      if (mu !== mu) continue; // No training value at all: nothing can be predicted.
      for (let x = 0; x < test.student.length; x++) {
        const a = test.student[x];
        const j = test.course[x];
        const truth = test.truth[x];
        const hasA = d.rowPtr[a + 1] > d.rowPtr[a];
        const hasJ = d.colPtr[j + 1] > d.colPtr[j];
        const gm = clamp(mu, scale);
        const cm = clamp(hasJ ? d.courseMean[j] : mu, scale);
        const sm = clamp(hasA ? d.mean[a] : mu, scale);
        const bm = clamp(mu + (hasA ? d.studentBias[a] : 0) + (hasJ ? d.courseBias[j] : 0), scale);
        A.g.add(gm, truth, true);
        A.c.add(cm, truth, hasJ);
        A.s.add(sm, truth, hasA);
        A.b.add(bm, truth, true);
        const E = baseErr[s];
        E.globalMean.push(Math.abs(gm - truth));
        E.courseMean.push(Math.abs(cm - truth));
        E.studentMean.push(Math.abs(sm - truth));
        E.dampedBias.push(Math.abs(bm - truth));
      }
      // Configurations: one scoring call per student over that student's test courses.
      settings.forEach((st, ci) => {
        let x = 0;
        while (x < test.student.length) {
          const a = test.student[x];
          let y = x;
          while (y < test.student.length && test.student[y] === a) y++;
          const targets = test.course.subarray(x, y);
          scorer.score(a, targets, st, [s]);
          const o = scorer.out[s];
          const rt = tables[ci]?.[s];
          const records = d.rowPtr[a + 1] - d.rowPtr[a];
          for (let t = 0; t < targets.length; t++) {
            let v = o.value[t];
            if (v !== v) v = baselineValue(d, a, targets[t], scale);
            if (v !== v) v = clamp(mu, scale);
            const kin = o.basis[t] === BASIS_NEIGHBOURS;
            A.cfg[ci].add(v, test.truth[x + t], kin);
            const range = likelyRange(rt, v, records, kin ? o.strength[t] : 0);
            cells[s][ci].add(a, Math.abs(v - test.truth[x + t]), test.truth[x + t], range);
          }
          x = y;
        }
      });
    }
  }
  const out: EvaluationReport = { plan, signals: {} };
  for (const s of signals) {
    const A = acc[s];
    out.signals[s] = {
      configurations: settings.map((st, ci) => ({
        settings: st,
        ...A.cfg[ci].metrics(),
        margin:
          options.bootstrap === 0
            ? null
            : cells[s][ci].margin(baseErr[s], options.bootstrap ?? 1000),
        ranges: calibrationTerm && tables[ci] ? cells[s][ci].ranges(calibrationTerm) : null,
      })),
      baselines: {
        globalMean: A.g.metrics(),
        courseMean: A.c.metrics(),
        studentMean: A.s.metrics(),
        dampedBias: A.b.metrics(),
      },
    };
  }
  return out;
}
