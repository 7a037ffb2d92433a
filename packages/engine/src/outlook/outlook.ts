import { Matrix, solve } from 'ml-matrix';
import { fitChoice, type ChoiceSet } from './choice';
import {
  markPassed,
  prerequisiteMet,
  stageOf,
  studentTerms,
  termsBefore,
  yearOf,
  YEARS,
  type OutlookData,
  type StudentTerms,
} from './data';
import { calibratedQ, coverage, interval, wape, Z80 } from './metrics';
import {
  BASE_FEATURES,
  historyOf,
  takeUpTable,
  termCounts,
  writeFeatures,
  type TakeUpTable,
  type TermCounts,
} from './take-up';

/** Training terms of the choice model and the load regression (method.md: 4). */
export const TRAINING_TERMS = 4;
/** Students per training term at scale (method.md: 3,000). */
export const TRAINING_SAMPLE = 3000;

/**
 * An extra feature of the logit for one student: writes its value for each course of
 * `courses` into `out` (e.g. fit/100 from the advising estimates). Off unless given.
 */
export type ExtraFeature = (
  term: number,
  student: number,
  courses: Int32Array,
  count: number,
  out: Float64Array,
) => void;

export interface OutlookOptions {
  /** Completed terms forecast as backtests (default 3). */
  backtests?: number;
  /** Earlier backtests computed only to calibrate the interval of the first ones (default 3). */
  calibration?: number;
  trainingTerms?: number;
  sample?: number;
  seed?: number;
  extraFeature?: ExtraFeature;
  /** Called once per forecast term with how far the work is. */
  onProgress?: (done: number, total: number, step: string) => void;
  /** Sees every student's choice probabilities of the live forecast (for the class profile). */
  onLiveStudent?: (
    student: number,
    courses: Int32Array,
    probabilities: Float64Array,
    count: number,
  ) => void;
}

/** The forecast of one term: per offered elective (in `courses` order) and the fit behind it. */
export interface TermOutlook {
  term: number;
  /** Offered electives of the term, ascending course numbers. */
  courses: Int32Array;
  expected: Float64Array;
  variance: Float64Array;
  low: Float64Array;
  high: Float64Array;
  /** 1 when the course had no open pair in the history (new, or not offered lately). */
  noHistory: Uint8Array;
  /** Simple forecasts: enrolment the last time it ran (and that term, −1 if never), the same term a year before, take-up rate × open students. */
  naive: Float64Array;
  naiveTerm: Int32Array;
  sameTerm: Float64Array;
  takeUp: Float64Array;
  /** Real enrolment (backtests only). */
  actual: Float64Array | null;
  /** The interval's multiplier and the backtests it was calibrated on. */
  q: number;
  qTerms: Int32Array;
  theta: Float64Array;
  standardErrors: Float64Array;
  /** |θ_j| × standard deviation of feature j over the training pairs: what moves the choice. */
  influence: Float64Array;
  /** b0..b3 of the load regression; null when it could not be fitted. */
  load: Float64Array | null;
  trainingTerms: Int32Array;
  students: number;
  modelWape: number | null;
  naiveWape: number | null;
  sameTermWape: number | null;
  takeUpWape: number | null;
  coverage: number | null;
}

export interface OutlookResult {
  /** The live forecast (null when the term has no offered electives). */
  forecast: TermOutlook | null;
  /** The reported backtests, oldest first. */
  backtests: TermOutlook[];
  /** Backtests computed only to calibrate q. */
  calibration: TermOutlook[];
}

/** A seeded sample of `size` students of `from` (all of them when fewer), kept in their order. */
export function sampleStudents(from: Int32Array, size: number, seed: number): Int32Array {
  if (from.length <= size) return from;
  // The students with the smallest seeded hashes: a fixed, spread-out sample.
  const hash = (s: number) => {
    let h = Math.imul(s ^ seed, 0x9e3779b1);
    h ^= h >>> 16;
    h = Math.imul(h, 0x85ebca6b);
    return (h ^ (h >>> 13)) >>> 0;
  };
  const keyed = Array.from(from, (s) => [hash(s), s] as const);
  keyed.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  return Int32Array.from(keyed.slice(0, size), (k) => k[1]).sort();
}

interface TrainingTerm {
  set: ChoiceSet;
  /** Load regression rows: (1, x, g, z) and the electives chosen. */
  loadX: Float64Array;
  loadY: Float64Array;
  loadRows: number;
}

/**
 * Everything the outlook computes from one snapshot: tables, training sets and student-term
 * summaries are built once and shared by the forecasts that need them.
 */
export class Outlook {
  readonly st: StudentTerms;
  private readonly tables = new Map<number, TakeUpTable>();
  private readonly counts = new Map<number, TermCounts>();
  private readonly training = new Map<number, TrainingTerm>();
  private readonly enrolment = new Map<number, Float64Array>();
  private readonly features: number;
  private readonly passed: Uint8Array;
  private readonly passedList: Int32Array;
  private passedCount = 0;
  private lastTheta: Float64Array | null = null;

  constructor(
    readonly data: OutlookData,
    private readonly options: OutlookOptions = {},
  ) {
    this.st = studentTerms(data);
    this.features = BASE_FEATURES + (options.extraFeature ? 1 : 0);
    this.passed = new Uint8Array(data.courseCount);
    this.passedList = new Int32Array(data.courseCount);
    // Enrolment per term and course: distinct students with a record.
    const last = new Int32Array(data.courseCount);
    for (const [t, students] of this.st.byTerm) {
      const counts = new Float64Array(data.courseCount);
      last.fill(-1);
      for (const s of students) {
        for (let r = data.recordFrom[s]; r < data.recordFrom[s + 1]; r++) {
          if (data.recordTerm[r] !== t) continue;
          const c = data.recordCourse[r];
          if (last[c] === s) continue;
          last[c] = s;
          counts[c]++;
        }
      }
      this.enrolment.set(t, counts);
    }
  }

  table(term: number): TakeUpTable {
    let t = this.tables.get(term);
    if (!t) {
      t = takeUpTable(this.data, this.st, term, (h) => {
        let c = this.counts.get(h);
        if (!c) this.counts.set(h, (c = termCounts(this.data, this.st, h)));
        return c;
      });
      this.tables.set(term, t);
    }
    return t;
  }

  private markPassed(s: number, term: number): void {
    this.passedCount = markPassed(
      this.data,
      s,
      term,
      this.passed,
      this.passedList,
      this.passedCount,
    );
  }

  /** g: mean electives per student-term by (programme, year at that term), before `term`. */
  meanElectives(term: number): Float64Array {
    const { data, st } = this;
    const sums = new Float64Array(data.programmeCount * YEARS);
    const counts = new Float64Array(data.programmeCount * YEARS);
    for (let s = 0; s + 1 < st.from.length; s++) {
      const p = data.studentProgramme[s];
      for (let i = st.from[s]; i < st.from[s + 1] && st.term[i] < term; i++) {
        const y = yearOf(data, s, st.term[i]);
        sums[p * YEARS + y] += st.electives[i];
        counts[p * YEARS + y]++;
      }
    }
    return sums.map((x, i) => (counts[i] > 0 ? x / counts[i] : 1));
  }

  /** The latest record term of s before `term`: its elective and total counts, or null. */
  private latest(s: number, term: number): { x: number; z: number } | null {
    const n = termsBefore(this.st, s, term);
    if (n === 0) return null;
    const i = this.st.from[s] + n - 1;
    return { x: this.st.electives[i], z: this.st.all[i] };
  }

  /** The offered electives of a term, ascending (empty when none were imported). */
  offered(term: number): Int32Array {
    const o = this.data.offerings.get(term);
    return o ? Int32Array.from(o).sort() : new Int32Array(0);
  }

  /** The choice situations and load rows of training term h (features from its own H(h)). */
  trainingTerm(h: number): TrainingTerm {
    const cached = this.training.get(h);
    if (cached) return cached;
    const { data, st } = this;
    const d = this.features;
    const table = this.table(h);
    const courses = this.offered(h);
    const all = st.byTerm.get(h) ?? new Int32Array(0);
    const students = sampleStudents(
      all,
      this.options.sample ?? TRAINING_SAMPLE,
      (this.options.seed ?? 2026) ^ h,
    );
    const g = this.meanElectives(h);
    const from = new Int32Array(students.length + 1);
    // Compact pairs (course and prerequisite flag; the student's groups per situation): the
    // features are looked up from the take-up table whenever the fit needs them.
    const capacity = Math.max(1, students.length * courses.length);
    let course = new Int32Array(capacity);
    let unmet = new Uint8Array(capacity);
    let chosen = new Float64Array(capacity);
    let extraValues = this.options.extraFeature ? new Float32Array(capacity) : null;
    const group = new Int32Array(students.length * 3);
    const loadX = new Float64Array(students.length * 4);
    const loadY = new Float64Array(students.length);
    let loadRows = 0;
    const enrolled = new Uint8Array(data.courseCount);
    const set = new Int32Array(courses.length);
    const extra = new Float64Array(courses.length);
    let pairs = 0;
    students.forEach((s, i) => {
      from[i] = pairs;
      const p = data.studentProgramme[s];
      const k = stageOf(st, s, h);
      const y = yearOf(data, s, h);
      group[i * 3] = p;
      group[i * 3 + 1] = k;
      group[i * 3 + 2] = y;
      this.markPassed(s, h);
      for (let r = data.recordFrom[s]; r < data.recordFrom[s + 1]; r++) {
        if (data.recordTerm[r] === h) enrolled[data.recordCourse[r]] = 1;
      }
      let n = 0;
      for (const c of courses) if (!this.passed[c]) set[n++] = c;
      if (this.options.extraFeature) this.options.extraFeature(h, s, set, n, extra);
      let picked = 0;
      for (let j = 0; j < n; j++) {
        const c = set[j];
        course[pairs] = c;
        unmet[pairs] = prerequisiteMet(data.prerequisites[c], this.passed) ? 0 : 1;
        if (extraValues) extraValues[pairs] = extra[j];
        chosen[pairs] = enrolled[c];
        picked += enrolled[c];
        pairs++;
      }
      for (let r = data.recordFrom[s]; r < data.recordFrom[s + 1]; r++) {
        enrolled[data.recordCourse[r]] = 0;
      }
      const last = this.latest(s, h);
      if (last) {
        loadX.set([1, last.x, g[p * YEARS + y], last.z], loadRows * 4);
        loadY[loadRows++] = picked;
      }
    });
    from[students.length] = pairs;
    course = course.slice(0, pairs);
    unmet = unmet.slice(0, pairs);
    chosen = chosen.slice(0, pairs);
    if (extraValues) extraValues = extraValues.slice(0, pairs);
    // Situation of each pair's start, found by walking `from` as fill is called in order.
    const situationOf = (a: number) => {
      let lo = 0;
      let hi = students.length - 1;
      while (lo < hi) {
        const mid = (lo + hi + 1) >> 1;
        if (from[mid] <= a) lo = mid;
        else hi = mid - 1;
      }
      return lo;
    };
    const level = data.courseLevel;
    const fill = (a: number, b: number, out: Float64Array) => {
      const i = situationOf(a);
      const p = group[i * 3];
      const k = group[i * 3 + 1];
      const y = group[i * 3 + 2];
      for (let c = a; c < b; c++) {
        const at = (c - a) * d;
        writeFeatures(table, level[course[c]], course[c], p, k, y, unmet[c], out, at);
        if (extraValues) out[at + BASE_FEATURES] = extraValues[c];
      }
    };
    const term: TrainingTerm = { set: { features: d, from, fill, chosen }, loadX, loadY, loadRows };
    this.training.set(h, term);
    return term;
  }

  /** Drops training sets of terms before `term`: they serve no later forecast. */
  forgetBefore(term: number): void {
    for (const h of [...this.training.keys()]) if (h < term) this.training.delete(h);
    for (const h of [...this.tables.keys()]) if (h < term) this.tables.delete(h);
    // Counts serve the history of later tables too: only those older than any of it go.
    const oldest = historyOf(this.st, term)[0] ?? term;
    for (const h of [...this.counts.keys()]) if (h < oldest) this.counts.delete(h);
  }

  /** The TRAINING_TERMS record terms before T with offerings and students. */
  trainingTermsOf(term: number): Int32Array {
    const n = this.options.trainingTerms ?? TRAINING_TERMS;
    const before = this.st.recordTerms.filter(
      (t) => t < term && this.data.offerings.has(t) && (this.st.byTerm.get(t)?.length ?? 0) > 0,
    );
    return before.slice(Math.max(0, before.length - n));
  }

  /**
   * θ for T from its training terms (θ = (1, 0, ...) , choice by take-up rate alone, when
   * nobody chose anything in them), the standard errors and each feature's influence.
   */
  fit(term: number): {
    theta: Float64Array;
    standardErrors: Float64Array;
    influence: Float64Array;
    load: Float64Array | null;
    terms: Int32Array;
  } {
    const d = this.features;
    const terms = this.trainingTermsOf(term);
    const sets = [...terms].map((h) => this.trainingTerm(h));
    // Each fit starts from the previous term's θ: neighbouring terms differ little.
    const fitted = fitChoice(
      sets.map((t) => t.set),
      d,
      this.lastTheta ? { start: this.lastTheta } : {},
    );
    if (fitted.observations > 0) this.lastTheta = fitted.theta;
    const theta =
      fitted.observations > 0
        ? fitted.theta
        : Float64Array.from({ length: d }, (_, j) => (j === 0 ? 1 : 0));
    // Standard deviation of each feature over every training pair.
    const sum = new Float64Array(d);
    const sq = new Float64Array(d);
    let n = 0;
    let scratch = new Float64Array(d);
    for (const t of sets) {
      const { from } = t.set;
      for (let i = 0; i + 1 < from.length; i++) {
        const a = from[i];
        const b = from[i + 1];
        if (scratch.length < (b - a) * d) scratch = new Float64Array((b - a) * d);
        const x = t.set.x ? t.set.x.subarray(a * d, b * d) : scratch;
        if (!t.set.x) t.set.fill!(a, b, scratch);
        for (let c = 0; c < b - a; c++) {
          for (let j = 0; j < d; j++) {
            const v = x[c * d + j];
            sum[j] += v;
            sq[j] += v * v;
          }
        }
        n += b - a;
      }
    }
    const influence = Float64Array.from({ length: d }, (_, j) =>
      n > 1 ? Math.abs(theta[j]) * Math.sqrt(Math.max(0, sq[j] / n - (sum[j] / n) ** 2)) : 0,
    );
    return {
      theta,
      standardErrors: fitted.standardErrors,
      influence,
      load: regressLoad(sets),
      terms,
    };
  }

  /**
   * Demand for T over `population` (method.md, "Load" and "Demand"), with the simple
   * forecasts; actual enrolment when T is a completed term.
   */
  forecastTerm(
    term: number,
    population: Int32Array,
    q: number,
    qTerms: Int32Array,
    completed: boolean,
    onStudent?: OutlookOptions['onLiveStudent'],
  ): TermOutlook {
    const { data, st } = this;
    const d = this.features;
    const courses = this.offered(term);
    const C = courses.length;
    const table = this.table(term);
    const fit = this.fit(term);
    const theta = fit.theta;
    const g = this.meanElectives(term);
    const expected = new Float64Array(C);
    const variance = new Float64Array(C);
    const takeUp = new Float64Array(C);
    const position = new Int32Array(data.courseCount).fill(-1);
    courses.forEach((c, i) => (position[c] = i));
    const x = new Float64Array(d);
    const set = new Int32Array(C);
    const v = new Float64Array(C);
    const prob = new Float64Array(C);
    const extra = new Float64Array(C);
    for (const s of population) {
      const p = data.studentProgramme[s];
      const k = stageOf(st, s, term);
      const y = yearOf(data, s, term);
      this.markPassed(s, term);
      let n = 0;
      for (const c of courses) if (!this.passed[c]) set[n++] = c;
      if (n === 0) continue;
      if (this.options.extraFeature) this.options.extraFeature(term, s, set, n, extra);
      let max = -Infinity;
      for (let j = 0; j < n; j++) {
        const c = set[j];
        const u = prerequisiteMet(data.prerequisites[c], this.passed) ? 0 : 1;
        writeFeatures(table, data.courseLevel[c], c, p, k, y, u, x, 0);
        // The take-up forecast: the rate times the students open to c (prerequisites passed).
        if (u === 0) takeUp[position[c]] += table.rc[c];
        if (d > BASE_FEATURES) x[BASE_FEATURES] = extra[j];
        let value = 0;
        for (let f = 0; f < d; f++) value += theta[f] * x[f];
        v[j] = value;
        if (value > max) max = value;
      }
      let sum = 0;
      for (let j = 0; j < n; j++) sum += v[j] = Math.exp(v[j] - max);
      const last = this.latest(s, term);
      const gs = g[p * YEARS + y];
      const e =
        last && fit.load
          ? Math.max(
              0,
              fit.load[0] + fit.load[1] * last.x + fit.load[2] * gs + fit.load[3] * last.z,
            )
          : gs;
      for (let j = 0; j < n; j++) {
        const ps = Math.min(1, (e * v[j]) / sum);
        prob[j] = ps;
        const i = position[set[j]];
        expected[i] += ps;
        variance[i] += ps * (1 - ps);
      }
      onStudent?.(s, set, prob, n);
    }
    const low = new Float64Array(C);
    const high = new Float64Array(C);
    for (let i = 0; i < C; i++) [low[i], high[i]] = interval(expected[i], variance[i], q);
    const noHistory = Uint8Array.from(courses, (c) => (table.mc[c] > 0 ? 0 : 1));
    const naive = new Float64Array(C);
    const naiveTerm = new Int32Array(C).fill(-1);
    const sameTerm = new Float64Array(C);
    const yearBefore = this.enrolment.get(term - data.termsPerYear);
    const earlier = [...st.recordTerms].filter((t) => t < term).reverse();
    courses.forEach((c, i) => {
      for (const t of earlier) {
        const count = this.enrolment.get(t)![c];
        if (count > 0) {
          naive[i] = count;
          naiveTerm[i] = t;
          break;
        }
      }
      sameTerm[i] = yearBefore ? yearBefore[c] : 0;
    });
    const enrolled = completed ? this.enrolment.get(term) : undefined;
    const actual = completed ? Float64Array.from(courses, (c) => enrolled?.[c] ?? 0) : null;
    return {
      term,
      courses,
      expected,
      variance,
      low,
      high,
      noHistory,
      naive,
      naiveTerm,
      sameTerm,
      takeUp,
      actual,
      q,
      qTerms,
      theta,
      standardErrors: fit.standardErrors,
      influence: fit.influence,
      load: fit.load,
      trainingTerms: fit.terms,
      students: population.length,
      modelWape: actual ? wape(expected, actual) : null,
      naiveWape: actual ? wape(naive, actual) : null,
      sameTermWape: actual ? wape(sameTerm, actual) : null,
      takeUpWape: actual ? wape(takeUp, actual) : null,
      coverage: actual ? coverage(low, high, actual) : null,
    };
  }
}

/** b of e_s = b0 + b1 x + b2 g + b3 z by least squares; null with fewer than 4 rows. */
export function regressLoad(
  terms: readonly { loadX: Float64Array; loadY: Float64Array; loadRows: number }[],
): Float64Array | null {
  const xtx = new Matrix(4, 4);
  const xty = new Matrix(4, 1);
  let rows = 0;
  for (const t of terms) {
    for (let r = 0; r < t.loadRows; r++) {
      for (let a = 0; a < 4; a++) {
        const xa = t.loadX[r * 4 + a];
        xty.set(a, 0, xty.get(a, 0) + xa * t.loadY[r]);
        for (let b = 0; b < 4; b++) xtx.set(a, b, xtx.get(a, b) + xa * t.loadX[r * 4 + b]);
      }
    }
    rows += t.loadRows;
  }
  if (rows < 4) return null;
  // SVD: a column that never varies (every student the same g) leaves the system singular.
  const b = solve(xtx, xty, true).getColumn(0);
  return b.every(Number.isFinite) ? Float64Array.from(b) : null;
}

/** How far a run is: `done` of `total` steps, and the step about to start. */
export interface OutlookProgress {
  done: number;
  total: number;
  step: string;
}

/**
 * The outlook for `next` over `population` (its active students) with its rolling-origin
 * backtests: the `backtests` latest completed terms before it, each with q calibrated on the
 * three backtests before it (so `calibration` earlier terms are forecast too). Yields before
 * each term, so a caller can report progress or let other work run.
 */
export function* outlookSteps(
  data: OutlookData,
  next: number,
  population: Int32Array,
  options: OutlookOptions = {},
): Generator<OutlookProgress, OutlookResult> {
  const outlook = new Outlook(data, options);
  const reported = options.backtests ?? 3;
  const extra = options.calibration ?? 3;
  const completed = outlook.st.recordTerms.filter((t) => t < next && data.offerings.has(t));
  const past = [...completed.slice(Math.max(0, completed.length - reported - extra))];
  const total = past.length + 1;
  const done: TermOutlook[] = [];
  for (let i = 0; i < past.length; i++) {
    const term = past[i];
    yield { done: i, total, step: `backtest ${term}` };
    const previous = done.slice(-3);
    const q = previous.length ? calibratedQ(previous.map(asBacktest)) : Z80;
    done.push(
      outlook.forecastTerm(
        term,
        outlook.st.byTerm.get(term) ?? new Int32Array(0),
        q,
        Int32Array.from(previous, (b) => b.term),
        true,
      ),
    );
    // Later forecasts train on later terms only.
    const window = outlook.trainingTermsOf(past[i + 1] ?? next);
    if (window.length) outlook.forgetBefore(window[0]);
  }
  yield { done: past.length, total, step: 'forecast' };
  const previous = done.slice(-3);
  const courses = outlook.offered(next);
  const forecast = courses.length
    ? outlook.forecastTerm(
        next,
        population,
        previous.length ? calibratedQ(previous.map(asBacktest)) : Z80,
        Int32Array.from(previous, (b) => b.term),
        false,
        options.onLiveStudent,
      )
    : null;
  const split = Math.max(0, done.length - reported);
  return { forecast, backtests: done.slice(split), calibration: done.slice(0, split) };
}

/** outlookSteps run to the end in one go. */
export function runOutlook(
  data: OutlookData,
  next: number,
  population: Int32Array,
  options: OutlookOptions = {},
): OutlookResult {
  const steps = outlookSteps(data, next, population, options);
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
    options.onProgress?.(step.value.done, step.value.total, step.value.step);
  }
}

function asBacktest(t: TermOutlook) {
  return { expected: t.expected, variance: t.variance, actual: t.actual ?? new Float64Array(0) };
}
