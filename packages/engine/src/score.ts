import { centeredColumns, Model, modelFor, SignalData, UnionRows, unionRows } from './model';
import { SimilarityWorkspace } from './similarity';
import { Basis, Confidence, Scale, Settings, Signal, SIGNALS, SimilaritySource } from './types';

export const BASIS_NONE = 0;
export const BASIS_BASELINE = 1;
export const BASIS_NEIGHBOURS = 2;
export const BASIS_NAMES: readonly Basis[] = ['none', 'baseline', 'neighbours'];
export const CONFIDENCE_NAMES: readonly Confidence[] = ['low', 'medium', 'high'];

/** Scales used by the fit and the confidence rule when the model has none. */
export const DEFAULT_SCALES: Readonly<Record<Signal, Scale>> = Object.freeze({
  grade: { min: 0, max: 4 },
  satisfaction: { min: 1, max: 5 },
});

/**
 * The confidence rule. Spread is the |w|-weighted standard deviation of the kin's deviations
 * (r_ij - m_i) divided by the width of the signal's scale.
 */
export const CONFIDENCE_RULE = {
  high: { minKin: 20, maxRelativeSpread: 0.15 },
  medium: { minKin: 10, maxRelativeSpread: 0.25 },
} as const;

export const CONFIDENCE_DESCRIPTION =
  'High: at least 20 similar past students contributed and their results, relative to their own ' +
  'averages, agree within 15% of the scale (weighted spread). Medium: at least 10 contributed and ' +
  'they agree within 25% of the scale. Low: anything else, including every estimate from the ' +
  'baseline. The fit score takes the lower confidence of the grade and satisfaction estimates.';

export function confidenceOf(basis: number, kin: number, spread: number, scale: Scale): number {
  if (basis !== BASIS_NEIGHBOURS) return 0;
  return confidenceLevel(kin, spread / (scale.max - scale.min));
}

function confidenceLevel(kin: number, rel: number): number {
  if (kin >= CONFIDENCE_RULE.high.minKin && rel <= CONFIDENCE_RULE.high.maxRelativeSpread) return 2;
  if (kin >= CONFIDENCE_RULE.medium.minKin && rel <= CONFIDENCE_RULE.medium.maxRelativeSpread) {
    return 1;
  }
  return 0;
}

/** One signal's results for a list of target courses; NaN marks "no value". */
export interface SignalScores {
  value: Float64Array;
  kin: Int32Array;
  basis: Uint8Array;
  spread: Float64Array;
  confidence: Uint8Array;
  /** Kin strength: sum of |w| over the kin (0 on the baseline). */
  strength: Float64Array;
}

function allocScores(n: number): SignalScores {
  return {
    value: new Float64Array(n),
    kin: new Int32Array(n),
    basis: new Uint8Array(n),
    spread: new Float64Array(n),
    confidence: new Uint8Array(n),
    strength: new Float64Array(n),
  };
}

/** The signal whose untaken courses are a student's candidates when no list is given. */
export function targetSignal(settings: Settings): Signal {
  const s = settings.gradeSimilarity;
  return s === 'satisfaction' ? 'satisfaction' : 'grade';
}

function clamp(v: number, scale: Scale | undefined): number {
  if (!scale) return v;
  return v < scale.min ? scale.min : v > scale.max ? scale.max : v;
}

/** The damped bias baseline b(a, j) = mu + b_a + b_j (NaN when j has no value). */
export function baselineValue(d: SignalData, a: number, j: number, scale?: Scale): number {
  if (j < 0 || d.colPtr[j + 1] === d.colPtr[j]) return NaN;
  return clamp(d.globalMean + (a >= 0 ? d.studentBias[a] : 0) + d.courseBias[j], scale);
}

/** The similarity source that serves a predicted signal. */
export function sourceFor(settings: Settings, s: Signal): SimilaritySource {
  return s === 'grade' ? settings.gradeSimilarity : settings.satisfactionSimilarity;
}

/** Below this much scanning in all, scan without walking when walking every candidate costs more. */
const WALK_FIRST_MIN = 20_000;
/**
 * Cost of a walked row entry relative to a scanned column entry, for the choice of where the
 * walk stops. A walked entry is a read of a compact row; a scanned course also pays for a
 * selection and for reading its k neighbours' w and deviations at scattered places, so
 * (measured at 50,000 and 200,000 students) walking about five times as far is cheaper.
 */
const WALK_COST = 0.2;
/** Fewest and most weight buckets for the best-first order of candidates. */
const MIN_BUCKETS = 256;
const MAX_BUCKETS = 65_535;
/** The bucket key of a student who is no candidate: after every bucket. */
const NO_KEY = 65_535;
/** A neighbourhood slot: w(a, i) and r_ij - m_i, side by side. */
const SLOT = 2;
/** Signal bits in course codes and union rows. */
const GRADE_BIT = 1;
const SATISFACTION_BIT = 2;

function bitOf(s: Signal): number {
  return s === 'grade' ? GRADE_BIT : SATISFACTION_BIT;
}

/**
 * Scores one student over a list of courses: neighbourhoods, predictions, basis and spread,
 * for one or both signals from the same similarities. One Scorer per thread; not reentrant;
 * its scratch arrays are sized to the model once and reused.
 *
 * Neighbourhoods are the k best candidates by (w descending, student key ascending). Two exact
 * routes give the same sets: walking candidates best-first and filling every course at once
 * (cheap for popular courses), and scanning a course's students (cheap for rare ones). The
 * scorer walks while walking is cheaper than scanning what is left with room, then scans the
 * courses still short of k from scratch.
 */
export class Scorer {
  readonly ws: SimilarityWorkspace;
  /**
   * The model of the last call: the built model, or its variant for the settings' centring
   * and damping (modelFor).
   */
  model: Model;
  readonly out: Record<Signal, SignalScores>;
  /** Neighbourhood sizes of the last call per target position. */
  fill: Record<Signal, Int32Array>;
  k = 0;
  /** Work of the last call (entries visited), for benchmarks. */
  stats = { candidates: 0, walked: 0, scanned: 0, rescans: 0 };
  /** Neighbourhoods of the last call: target t -> records [t*k, t*k + fill), best first. */
  private slots: Record<Signal, Float64Array>;
  private cap = 0;
  private readonly cand: Int32Array;
  private readonly sorted: Int32Array;
  /**
   * Per course: 0 when not a target, else (first target position + 1) * 4 + signal bits, a
   * bit set while that signal's neighbourhood has room.
   */
  private readonly code: Int32Array;
  /**
   * Weight bucket of each candidate (NO_KEY for the rest), monotone in w: a scan rejects most
   * entries by this small array without reading w.
   */
  private readonly key: Uint16Array;
  private readonly bucketStart: Int32Array;
  private bufQ = new Int32Array(0);
  private bufK = new Int32Array(0);
  /** Candidates the last walk took (a prefix of `sorted`). */
  private walkedTo = 0;
  /** Keeps the loads of touchAhead observable. */
  sink = 0;

  constructor(readonly base: Model) {
    const model = base;
    this.model = base;
    this.ws = new SimilarityWorkspace(model);
    const S = model.studentKeys.length;
    this.cand = new Int32Array(S);
    this.sorted = new Int32Array(S);
    this.key = new Uint16Array(S);
    this.code = new Int32Array(model.courseKeys.length);
    this.bucketStart = new Int32Array(bucketCount(S) + 1);
    this.out = { grade: allocScores(0), satisfaction: allocScores(0) };
    this.slots = { grade: new Float64Array(0), satisfaction: new Float64Array(0) };
    this.fill = { grade: new Int32Array(0), satisfaction: new Int32Array(0) };
  }

  /**
   * What the last call predicted target t from in signal s: w(a, i) and r_ij - m_i of each
   * neighbour, best first (for audits and tests).
   */
  neighbourhood(s: Signal, t: number): { w: number[]; deviation: number[] } {
    const out = { w: [] as number[], deviation: [] as number[] };
    const slots = this.slots[s];
    for (let r = 0; r < this.fill[s][t]; r++) {
      out.w.push(slots[(t * this.k + r) * SLOT]);
      out.deviation.push(slots[(t * this.k + r) * SLOT + 1]);
    }
    return out;
  }

  /**
   * The neighbourhood of course j in signal s, listed directly from the course's students
   * with the similarities of the last call (student a): best first by (w desc, key asc), at
   * most k. The same set the last call predicted from; for explanations and audits.
   */
  neighboursOf(
    s: Signal,
    j: number,
    a: number,
    settings: Settings,
  ): { student: number; w: number; value: number }[] {
    if (j < 0) return [];
    const d = this.model.signals[s];
    const w = this.ws.w;
    const rank = this.model.studentRank;
    const list: { student: number; w: number; value: number }[] = [];
    for (let q = d.colPtr[j]; q < d.colPtr[j + 1]; q++) {
      const i = d.colStudent[q];
      if (i !== a && w[i] > settings.minSimilarity) {
        list.push({ student: i, w: w[i], value: d.colValue[q] });
      }
    }
    list.sort((x, y) => y.w - x.w || rank[x.student] - rank[y.student]);
    return list.slice(0, Math.max(0, Math.floor(settings.k)));
  }

  private ensure(T: number, k: number): void {
    if (T > this.cap || k !== this.k) {
      this.cap = Math.max(T, this.cap);
      this.k = k;
      for (const s of SIGNALS) {
        this.out[s] = allocScores(this.cap);
        this.slots[s] = new Float64Array(this.cap * k * SLOT);
        this.fill[s] = new Int32Array(this.cap);
      }
      const size = Math.max(2 * k, k + 16);
      this.bufQ = new Int32Array(size);
      this.bufK = new Int32Array(size);
    }
  }

  /**
   * Score student `a` (index, -1 for a student without records) on `targets` (course indices,
   * -1 for an unknown course). Results land in `this.out[signal]` at positions 0..T-1.
   */
  score(
    a: number,
    targets: ArrayLike<number>,
    settings: Settings,
    signals: readonly Signal[],
  ): void {
    const model = modelFor(this.base, settings);
    this.model = model;
    this.ws.model = model;
    const k = Math.max(0, Math.floor(settings.k));
    this.ensure(targets.length, k);
    const sig: Signal[] = [];
    for (const s of signals) if (!sig.includes(s)) sig.push(s);
    // Signals served by the same similarity share one pass (and one walk).
    if (sig.length < 2 || sourceFor(settings, sig[0]) === sourceFor(settings, sig[1])) {
      this.pass(a, targets, settings, sig, sourceFor(settings, sig[0] ?? 'grade'));
    } else {
      for (const s of sig) this.pass(a, targets, settings, [s], sourceFor(settings, s));
    }
  }

  private pass(
    a: number,
    targets: ArrayLike<number>,
    settings: Settings,
    sig: Signal[],
    source: SimilaritySource,
  ): void {
    const model = this.model;
    const T = targets.length;
    const k = this.k;
    const ws = this.ws;
    ws.computeSource(a, settings, source, false);
    const w = ws.w;
    const minSim = settings.minSimilarity;
    const nc =
      ws.dense || minSim < 0
        ? // Students sharing nothing have w = 0, which passes a negative threshold.
          collectAll(model.studentKeys.length, w, a, minSim, this.cand)
        : collectCandidates(ws.touched, ws.nTouched, w, a, minSim, this.cand);

    const code = this.code;
    for (let t = 0; t < T; t++) {
      const j = targets[t];
      if (j >= 0 && code[j] === 0) code[j] = (t + 1) << 2;
    }
    let remainingScan = 0;
    for (const s of sig) {
      this.fill[s].fill(0, 0, T);
      if (k > 0) remainingScan += openTargets(targets, code, model.signals[s].colPtr, bitOf(s));
    }
    this.stats.candidates = nc;
    this.stats.walked = 0;
    this.stats.scanned = 0;
    this.stats.rescans = 0;

    let keyed = false;
    if (nc > 0 && remainingScan > 0) {
      // Scanning everything is cheaper than walking every candidate: no walk at all.
      let scanOnly = false;
      if (remainingScan <= WALK_FIRST_MIN) {
        let walkAll = 0;
        for (const s of sig) walkAll += rowLengthSum(this.cand, nc, model.signals[s].rowPtr);
        scanOnly = remainingScan <= walkAll;
      }
      if (!scanOnly) {
        remainingScan = this.walk(nc, remainingScan, sig);
        keyed = true;
      }
    } else remainingScan = 0;

    // Scan what the walk left with room; a neighbourhood with room after a full walk is final.
    if (remainingScan > 0) {
      if (!keyed) this.key.fill(0);
      const rank = model.studentRank;
      const S = model.studentKeys.length;
      for (const s of sig) {
        const bit = bitOf(s);
        const fill = this.fill[s];
        const d = model.signals[s];
        const dev = centeredColumns(d);
        const slots = this.slots[s];
        for (let t = 0; t < T; t++) {
          const j = targets[t];
          if (j < 0) continue;
          const c = code[j];
          if (c >> 2 !== t + 1 || (c & bit) === 0) continue;
          const from = d.colPtr[j];
          const to = d.colPtr[j + 1];
          // Candidates have keys below NO_KEY; without buckets every key is 0 and every entry
          // is judged by w. With buckets, first try a bar at the key where about 2(k - fill)
          // more of the course's students are expected, were they spread like everyone.
          let bar = keyed ? NO_KEY - 1 : 0;
          const rest = to - from - fill[t];
          if (keyed && rest > k) {
            const R = this.walkedTo;
            const P = R + Math.ceil(((2 * (k - fill[t]) + 8) * (S - R)) / rest);
            if (P < nc) bar = this.key[this.sorted[P - 1]];
          }
          let n = scanTopK(
            d.colStudent,
            dev,
            from,
            to,
            a,
            minSim,
            w,
            this.key,
            bar,
            rank,
            k,
            this.bufQ,
            this.bufK,
            slots,
            t * k,
          );
          this.stats.scanned += to - from;
          if (n < k && bar < NO_KEY - 1 && keyed) {
            // Too few above the guessed bar: the answer needs everyone.
            n = scanTopK(
              d.colStudent,
              dev,
              from,
              to,
              a,
              minSim,
              w,
              this.key,
              NO_KEY - 1,
              rank,
              k,
              this.bufQ,
              this.bufK,
              slots,
              t * k,
            );
            this.stats.scanned += to - from;
            this.stats.rescans++;
          }
          fill[t] = n;
        }
      }
    }

    for (const s of sig) {
      const d = model.signals[s];
      const scale = model.scales[s];
      const o = this.out[s];
      predictFromSlots(
        d,
        a,
        targets,
        code,
        this.fill[s],
        k,
        Math.max(1, settings.minNeighbours),
        this.slots[s],
        // Plain numbers, not scale objects: one shape for the optimiser.
        scale ? scale.min : -Infinity,
        scale ? scale.max : Infinity,
        (scale ?? DEFAULT_SCALES[s]).max - (scale ?? DEFAULT_SCALES[s]).min,
        o.value,
        o.kin,
        o.basis,
        o.spread,
        o.confidence,
        o.strength,
      );
    }
    for (let t = 0; t < T; t++) if (targets[t] >= 0) code[targets[t]] = 0;
  }

  /**
   * Best-first walk over candidates. Stops once the walk has cost as much as scanning what is
   * still open (within 2x of the best stopping point). Returns the scan cost still to do, 0 when
   * every neighbourhood is final. Leaves every student's bucket key set.
   */
  private walk(nc: number, remainingScan: number, sig: readonly Signal[]): number {
    const model = this.model;
    const w = this.ws.w;
    const rank = model.studentRank;
    const k = this.k;
    const sorted = this.sorted;
    const bs = this.bucketStart;
    this.key.fill(NO_KEY);
    const nb = bucketByWeight(this.cand, nc, w, sorted, bs, bucketCount(nc), this.key);
    const g = model.signals.grade;
    const sa = model.signals.satisfaction;
    const both = sig.length > 1;
    // Union rows carry student centres only; cells centred on b_uj walk each signal's rows.
    const shifted = model.variant !== null && model.variant[0] === 'b';
    const u = both && !shifted ? unionRows(model) : null;
    const union = u !== null && u.ok;
    const d = model.signals[sig[0]];
    const bit = bitOf(sig[0]);
    const d1 = model.signals[sig[both ? 1 : 0]];
    const bit1 = bitOf(sig[both ? 1 : 0]);
    const code = this.code;
    const C = model.courseKeys.length;
    // Courses above popularity position `full` are all closed (or not targets): union rows,
    // rarest first, are read only up to the first of them.
    let full = 0;
    let touchedTo = 0;
    let walked = 0;
    for (let b = 0; b < nb; b++) {
      const start = bs[b];
      const end = bs[b + 1];
      if (end - start > 1) sortByWeight(sorted, start, end - 1, w, rank);
      for (let c = start; c < end; c++) {
        if (union && c >= touchedTo) {
          // Touch the next candidates' rows and means in one loop of independent loads, so
          // their cache misses overlap instead of queueing one by one in the walk.
          touchedTo = Math.min(end, c + PREFETCH);
          const uu = u as UnionRows;
          this.sink = touchAhead(sorted, c, touchedTo, uu.ptr, uu.code, uu.means);
        }
        if (walked * WALK_COST >= remainingScan) {
          this.stats.walked = walked;
          this.walkedTo = c;
          return remainingScan;
        }
        const i = sorted[c];
        const wi = w[i];
        if (union) {
          const uu = u as UnionRows;
          const byPop = uu.byPopularity;
          while (full < C && (code[byPop[full]] & 3) === 0) full++;
          const saved = walkUnion(
            uu.ptr,
            uu.code,
            uu.popularity,
            full,
            i,
            wi,
            code,
            k,
            uu.gradeValues,
            g.colPtr,
            uu.means[2 * i],
            this.fill.grade,
            this.slots.grade,
            uu.satisfactionValues,
            sa.colPtr,
            uu.means[2 * i + 1],
            this.fill.satisfaction,
            this.slots.satisfaction,
          );
          const read = saved % 65536;
          walked += read;
          remainingScan -= (saved - read) / 65536;
        } else {
          walked += d.rowPtr[i + 1] - d.rowPtr[i];
          remainingScan -= walkRow(d, i, wi, code, bit, this.fill[sig[0]], k, this.slots[sig[0]]);
          if (both) {
            walked += d1.rowPtr[i + 1] - d1.rowPtr[i];
            remainingScan -= walkRow(
              d1,
              i,
              wi,
              code,
              bit1,
              this.fill[sig[1]],
              k,
              this.slots[sig[1]],
            );
          }
        }
        if (remainingScan === 0) {
          this.stats.walked = walked;
          return 0;
        }
      }
    }
    this.stats.walked = walked;
    return 0;
  }
}

const PREFETCH = 32;

function touchAhead(
  sorted: Int32Array,
  from: number,
  to: number,
  uPtr: Int32Array,
  uCode: Int32Array,
  means: Float64Array,
): number {
  let sink = 0;
  for (let c = from; c < to; c++) {
    const i = sorted[c];
    sink += uCode[uPtr[i]] + means[2 * i];
  }
  return sink;
}

function bucketCount(n: number): number {
  return Math.min(MAX_BUCKETS, Math.max(MIN_BUCKETS, 2 * n));
}

/** The smallest and largest w of the last collected candidates (bucketing needs both). */
const wRange = new Float64Array(2);

function collectCandidates(
  touched: Int32Array,
  nTouched: number,
  w: Float64Array,
  a: number,
  minSim: number,
  cand: Int32Array,
): number {
  let nc = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let t = 0; t < nTouched; t++) {
    const i = touched[t];
    const x = w[i];
    if (i !== a && x > minSim) {
      cand[nc++] = i;
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
  }
  wRange[0] = lo;
  wRange[1] = hi;
  return nc;
}

function collectAll(
  S: number,
  w: Float64Array,
  a: number,
  minSim: number,
  cand: Int32Array,
): number {
  let nc = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < S; i++) {
    const x = w[i];
    if (x > minSim && i !== a) {
      cand[nc++] = i;
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
  }
  wRange[0] = lo;
  wRange[1] = hi;
  return nc;
}

/**
 * Mark each distinct target course with a value in the signal as open (bit), and return the
 * cost of scanning them all.
 */
function openTargets(
  targets: ArrayLike<number>,
  code: Int32Array,
  colPtr: Int32Array,
  bit: number,
): number {
  let sum = 0;
  for (let t = 0; t < targets.length; t++) {
    const j = targets[t];
    if (j < 0 || code[j] >> 2 !== t + 1) continue;
    const n = colPtr[j + 1] - colPtr[j];
    if (n > 0) {
      code[j] |= bit;
      sum += n;
    }
  }
  return sum;
}

function rowLengthSum(cand: Int32Array, nc: number, rowPtr: Int32Array): number {
  let sum = 0;
  for (let c = 0; c < nc; c++) sum += rowPtr[cand[c] + 1] - rowPtr[cand[c]];
  return sum;
}

// The upper 32 bits of a double: for positive numbers they grow with the number, so they give
// logarithmic buckets (a fixed share of each power of two) that are exactly monotone.
const f64 = new Float64Array(1);
const u32 = new Uint32Array(f64.buffer);
const HIGH = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;
/** Octaves below the largest w that logarithmic buckets tell apart. */
const LOG_OCTAVES = 24;
function highBits(x: number): number {
  f64[0] = x;
  return u32[HIGH];
}

/**
 * Counting sort of candidates into buckets of w, best bucket first; bucket b is
 * sorted[bs[b], bs[b + 1]) and key[i] = b. The bucket of w is monotone in w, so sorting each
 * bucket by (w desc, rank asc) gives the full order. Buckets are logarithmic when every
 * candidate has w > 0 (most candidates have a small w), linear otherwise.
 */
function bucketByWeight(
  cand: Int32Array,
  nc: number,
  w: Float64Array,
  sorted: Int32Array,
  bs: Int32Array,
  maxBuckets: number,
  key: Uint16Array,
): number {
  // Set by the collect that filled cand.
  const lo = wRange[0];
  const hi = wRange[1];
  let nb: number;
  if (lo > 0) {
    const top = highBits(hi);
    // Everything below hi / 2^LOG_OCTAVES shares the last bucket.
    const range = Math.min(top - highBits(lo), LOG_OCTAVES << 20);
    let shift = 0;
    while (range >>> shift >= maxBuckets) shift++;
    nb = (range >>> shift) + 1;
    const last = nb - 1;
    bs.fill(0, 0, nb + 1);
    for (let c = 0; c < nc; c++) {
      const i = cand[c];
      const x = (top - highBits(w[i])) >>> shift;
      const b = x < last ? x : last;
      key[i] = b;
      bs[b + 1]++;
    }
  } else {
    nb = maxBuckets;
    bs.fill(0, 0, nb + 1);
    const scale = hi > lo ? (nb - 1) / (hi - lo) : 0;
    for (let c = 0; c < nc; c++) {
      const i = cand[c];
      const b = Math.floor((hi - w[i]) * scale);
      key[i] = b;
      bs[b + 1]++;
    }
  }
  for (let b = 0; b < nb; b++) bs[b + 1] += bs[b];
  // Place with bs[b] as the cursor of bucket b; afterwards bs[b] is the end of b, so shift.
  for (let c = 0; c < nc; c++) {
    const i = cand[c];
    sorted[bs[key[i]]++] = i;
  }
  for (let b = nb; b > 0; b--) bs[b] = bs[b - 1];
  bs[0] = 0;
  return nb;
}

/** Sort idx[lo..hi] (inclusive) by (w descending, rank ascending): quicksort, insertion below 16. */
function sortByWeight(
  idx: Int32Array,
  lo: number,
  hi: number,
  w: Float64Array,
  rank: Int32Array,
): void {
  while (hi - lo >= 16) {
    // Median of three as the pivot.
    const mid = (lo + hi) >> 1;
    if (before(idx[mid], idx[lo], w, rank)) swap(idx, mid, lo);
    if (before(idx[hi], idx[lo], w, rank)) swap(idx, hi, lo);
    if (before(idx[hi], idx[mid], w, rank)) swap(idx, hi, mid);
    const pv = idx[mid];
    const pw = w[pv];
    const pr = rank[pv];
    let i = lo;
    let j = hi;
    while (i <= j) {
      for (;;) {
        const x = idx[i];
        const wx = w[x];
        if (wx > pw || (wx === pw && rank[x] < pr)) i++;
        else break;
      }
      for (;;) {
        const x = idx[j];
        const wx = w[x];
        if (wx < pw || (wx === pw && rank[x] > pr)) j--;
        else break;
      }
      if (i <= j) {
        swap(idx, i, j);
        i++;
        j--;
      }
    }
    // Recurse into the smaller side, loop on the larger.
    if (j - lo < hi - i) {
      if (lo < j) sortByWeight(idx, lo, j, w, rank);
      lo = i;
    } else {
      if (i < hi) sortByWeight(idx, i, hi, w, rank);
      hi = j;
    }
  }
  for (let p = lo + 1; p <= hi; p++) {
    const x = idx[p];
    const wx = w[x];
    const rx = rank[x];
    let q = p - 1;
    while (q >= lo) {
      const y = idx[q];
      const wy = w[y];
      if (wy > wx || (wy === wx && rank[y] < rx)) break;
      idx[q + 1] = y;
      q--;
    }
    idx[q + 1] = x;
  }
}

function before(x: number, y: number, w: Float64Array, rank: Int32Array): boolean {
  return w[x] > w[y] || (w[x] === w[y] && rank[x] < rank[y]);
}

function swap(idx: Int32Array, p: number, q: number): void {
  const t = idx[p];
  idx[p] = idx[q];
  idx[q] = t;
}

/**
 * Add candidate i to the neighbourhood of every open target course in its row (one signal).
 * Returns the scan cost that no longer needs doing (courses that just filled).
 */
function walkRow(
  d: SignalData,
  i: number,
  wi: number,
  code: Int32Array,
  bit: number,
  fill: Int32Array,
  k: number,
  slots: Float64Array,
): number {
  const rowCourse = d.rowCourse;
  const rowValue = d.rowValue;
  const shift = d.courseShift;
  const mi = d.mean[i];
  let saved = 0;
  const e = d.rowPtr[i + 1];
  for (let p = d.rowPtr[i]; p < e; p++) {
    const j = rowCourse[p];
    const c = code[j];
    if ((c & bit) === 0) continue;
    const t = (c >> 2) - 1;
    const f = fill[t];
    const r = (t * k + f) * SLOT;
    slots[r] = wi;
    slots[r + 1] = rowValue[p] - mi - shift[j];
    fill[t] = f + 1;
    if (f + 1 === k) {
      code[j] = c ^ bit;
      saved += d.colPtr[j + 1] - d.colPtr[j];
    }
  }
  return saved;
}

/**
 * walkRow for both signals at once over the union row; values come from the value ids in
 * the row entries, so only the compact row is read.
 */
function walkUnion(
  uPtr: Int32Array,
  uCode: Int32Array,
  popularity: Int32Array,
  full: number,
  i: number,
  wi: number,
  code: Int32Array,
  k: number,
  gValues: Float64Array,
  gColPtr: Int32Array,
  gMean: number,
  gFill: Int32Array,
  gSlots: Float64Array,
  sValues: Float64Array,
  sColPtr: Int32Array,
  sMean: number,
  sFill: Int32Array,
  sSlots: Float64Array,
): number {
  let saved = 0;
  const e = uPtr[i + 1];
  let p = uPtr[i];
  for (; p < e; p++) {
    const x = uCode[p];
    const j = x >> 16;
    if (popularity[j] < full) break;
    const c = code[j];
    const hit = c & x & 3;
    if (hit === 0) continue;
    const t = (c >> 2) - 1;
    let cc = c;
    if (hit & GRADE_BIT) {
      const f = gFill[t];
      const r = (t * k + f) * SLOT;
      gSlots[r] = wi;
      gSlots[r + 1] = gValues[((x >> 9) & 127) - 1] - gMean;
      gFill[t] = f + 1;
      if (f + 1 === k) {
        cc ^= GRADE_BIT;
        saved += gColPtr[j + 1] - gColPtr[j];
      }
    }
    if (hit & SATISFACTION_BIT) {
      const f = sFill[t];
      const r = (t * k + f) * SLOT;
      sSlots[r] = wi;
      sSlots[r + 1] = sValues[((x >> 2) & 127) - 1] - sMean;
      sFill[t] = f + 1;
      if (f + 1 === k) {
        cc ^= SATISFACTION_BIT;
        saved += sColPtr[j + 1] - sColPtr[j];
      }
    }
    code[j] = cc;
  }
  // Scan cost saved * 2^16 + entries read (a row has fewer than 2^15 entries).
  return saved * 65536 + (p - uPtr[i]);
}

/** The mean-centred weighted prediction (or the baseline) for every target of one signal. */
function predictFromSlots(
  d: SignalData,
  a: number,
  targets: ArrayLike<number>,
  code: Int32Array,
  fill: Int32Array,
  k: number,
  need: number,
  slots: Float64Array,
  lo: number,
  hi: number,
  width: number,
  value: Float64Array,
  kin: Int32Array,
  basis: Uint8Array,
  spreadOut: Float64Array,
  confidence: Uint8Array,
  strength: Float64Array,
): void {
  const ma = a >= 0 ? d.mean[a] : d.globalMean;
  const T = targets.length;
  for (let t = 0; t < T; t++) {
    const j = targets[t];
    const t0 = j >= 0 ? (code[j] >> 2) - 1 : t;
    if (t0 !== t) {
      // A repeated course: copy the first answer.
      value[t] = value[t0];
      kin[t] = kin[t0];
      basis[t] = basis[t0];
      spreadOut[t] = spreadOut[t0];
      confidence[t] = confidence[t0];
      strength[t] = strength[t0];
      fill[t] = fill[t0];
      continue;
    }
    const n = j >= 0 ? fill[t] : 0;
    kin[t] = n;
    if (n >= need) {
      let num = 0;
      let den = 0;
      const from = t * k * SLOT;
      const to = from + n * SLOT;
      for (let q = from; q < to; q += SLOT) {
        const wi = slots[q];
        num += wi * slots[q + 1];
        den += Math.abs(wi);
      }
      const dev = den > 0 ? num / den : 0;
      // Weighted spread of deviations around their weighted mean; equal weights if all w = 0.
      let m = 0;
      let tot = 0;
      for (let q = from; q < to; q += SLOT) {
        const u = den > 0 ? Math.abs(slots[q]) : 1;
        m += u * slots[q + 1];
        tot += u;
      }
      m /= tot;
      let v = 0;
      for (let q = from; q < to; q += SLOT) {
        const u = den > 0 ? Math.abs(slots[q]) : 1;
        const e = slots[q + 1] - m;
        v += u * e * e;
      }
      const spread = Math.sqrt(v / tot);
      // The centre of the cell: m_a, or b_aj = (mu + b_a) + b_j under baseline centring.
      const p = ma + d.courseShift[j] + dev;
      strength[t] = den;
      value[t] = p < lo ? lo : p > hi ? hi : p;
      basis[t] = BASIS_NEIGHBOURS;
      spreadOut[t] = spread;
      confidence[t] = confidenceLevel(n, spread / width);
    } else {
      let b =
        j >= 0 && d.colPtr[j + 1] > d.colPtr[j]
          ? d.globalMean + (a >= 0 ? d.studentBias[a] : 0) + d.courseBias[j]
          : NaN;
      if (b < lo) b = lo;
      else if (b > hi) b = hi;
      value[t] = b;
      basis[t] = b === b ? BASIS_BASELINE : BASIS_NONE;
      spreadOut[t] = NaN;
      confidence[t] = 0;
      strength[t] = 0;
    }
  }
}

/**
 * Top-k of one course column, written best first into the slots from `base`. The order is
 * (key asc, w desc, key rank asc), the same as (w desc, rank asc) because keys are monotone in
 * w; w and rank are read only when keys are equal. Entries before the bar go to a buffer of
 * about 2k (column positions and keys); when it fills, a selection keeps the best k and the
 * bar becomes the worst of them, so most entries cost one small read and one comparison.
 * `startKey` is the first bar's key when candidates have bucket keys (others NO_KEY): the
 * answer is exact when at least k entries pass it (NO_KEY - 1 lets every candidate pass); 0
 * when all keys are 0.
 * Returns the neighbourhood size.
 */
function scanTopK(
  colStudent: Int32Array,
  colDev: Float64Array,
  from: number,
  to: number,
  a: number,
  minSim: number,
  w: Float64Array,
  key: Uint16Array,
  startKey: number,
  rank: Int32Array,
  k: number,
  bq: Int32Array,
  bk: Int32Array,
  slots: Float64Array,
  base: number,
): number {
  if (k === 0) return 0;
  const size = bq.length;
  let n = 0;
  // The bar (tk, tw, tr). Keyed, every key up to startKey passes (keys below NO_KEY belong to
  // candidates); with all keys 0, entries pass on w > minSim.
  let tk = startKey;
  let tw = startKey === 0 ? minSim : -Infinity;
  let tr = -1;
  for (let q = from; q < to; q++) {
    const i = colStudent[q];
    const ki = key[i];
    if (ki > tk) continue;
    if (ki === tk) {
      const wi = w[i];
      if (wi < tw || (wi === tw && !(rank[i] < tr))) continue;
    }
    if (i === a) continue;
    bq[n] = q;
    bk[n] = ki;
    if (++n === size) {
      selectBest(bq, bk, n - 1, k, colStudent, w, rank);
      n = k;
      let m = 0;
      for (let x = 1; x < k; x++) if (after(bq[x], bk[x], bq[m], bk[m], colStudent, w, rank)) m = x;
      tk = bk[m];
      tw = w[colStudent[bq[m]]];
      tr = rank[colStudent[bq[m]]];
    }
  }
  if (n > k) {
    selectBest(bq, bk, n - 1, k, colStudent, w, rank);
    n = k;
  }
  // Best first: insertion sort of at most k entries.
  for (let p = 1; p < n; p++) {
    const q0 = bq[p];
    const k0 = bk[p];
    let x = p - 1;
    for (; x >= 0 && after(bq[x], bk[x], q0, k0, colStudent, w, rank); x--) {
      bq[x + 1] = bq[x];
      bk[x + 1] = bk[x];
    }
    bq[x + 1] = q0;
    bk[x + 1] = k0;
  }
  for (let m = 0; m < n; m++) {
    const q = bq[m];
    const r = (base + m) * SLOT;
    slots[r] = w[colStudent[q]];
    slots[r + 1] = colDev[q];
  }
  return n;
}

/** Whether column entry q1 (key k1) comes after q2 (key k2) in (key asc, w desc, rank asc). */
function after(
  q1: number,
  k1: number,
  q2: number,
  k2: number,
  colStudent: Int32Array,
  w: Float64Array,
  rank: Int32Array,
): boolean {
  if (k1 !== k2) return k1 > k2;
  if (q1 === q2) return false;
  const i1 = colStudent[q1];
  const i2 = colStudent[q2];
  const w1 = w[i1];
  const w2 = w[i2];
  return w1 < w2 || (w1 === w2 && rank[i1] > rank[i2]);
}

/**
 * Quickselect on buffer entries [0..hi]: afterwards the best k of them are at 0..k-1, in no
 * particular order.
 */
function selectBest(
  bq: Int32Array,
  bk: Int32Array,
  hi: number,
  k: number,
  colStudent: Int32Array,
  w: Float64Array,
  rank: Int32Array,
): void {
  let lo = 0;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    const pq = bq[mid];
    const pk = bk[mid];
    let i = lo;
    let j = hi;
    while (i <= j) {
      // Skip entries better than the pivot from the left, worse from the right.
      while (after(pq, pk, bq[i], bk[i], colStudent, w, rank)) i++;
      while (after(bq[j], bk[j], pq, pk, colStudent, w, rank)) j--;
      if (i <= j) {
        const tq = bq[i];
        bq[i] = bq[j];
        bq[j] = tq;
        const tk = bk[i];
        bk[i] = bk[j];
        bk[j] = tk;
        i++;
        j--;
      }
    }
    // Now [lo..j] are at least as good as the pivot, [i..hi] at most as good.
    if (k - 1 <= j) hi = j;
    else if (k - 1 >= i) lo = i;
    else return;
  }
}

/** Courses where student a has no value in the signal, in course index order. */
export function untakenCourses(model: Model, a: number, signal: Signal): Int32Array {
  const C = model.courseKeys.length;
  const d = model.signals[signal];
  if (a < 0) return Int32Array.from({ length: C }, (_, c) => c);
  const out = new Int32Array(C - (d.rowPtr[a + 1] - d.rowPtr[a]));
  let n = 0;
  let p = d.rowPtr[a];
  const e = d.rowPtr[a + 1];
  for (let c = 0; c < C; c++) {
    if (p < e && d.rowCourse[p] === c) {
      p++;
      continue;
    }
    out[n++] = c;
  }
  return out;
}

/** Fit 0-100 from the two signals' values (NaN = none). Returns [fit, from] with from 0 both, 1 grade, 2 satisfaction, -1 none. */
export function fitOf(
  grade: number,
  satisfaction: number,
  alpha: number,
  gradeScale: Scale,
  satScale: Scale,
): [number, number] {
  return [
    fitScore(grade, satisfaction, alpha, gradeScale, satScale),
    fitSource(grade, satisfaction),
  ];
}

/** fitOf's value without an array (batch scoring calls it for every cell). */
export function fitScore(
  grade: number,
  satisfaction: number,
  alpha: number,
  gradeScale: Scale,
  satScale: Scale,
): number {
  const g =
    grade === grade ? unit((grade - gradeScale.min) / (gradeScale.max - gradeScale.min)) : NaN;
  const s =
    satisfaction === satisfaction
      ? unit((satisfaction - satScale.min) / (satScale.max - satScale.min))
      : NaN;
  if (g === g && s === s) return 100 * (alpha * g + (1 - alpha) * s);
  if (g === g) return 100 * g;
  if (s === s) return 100 * s;
  return NaN;
}

/** fitOf's source: 0 both, 1 grade, 2 satisfaction, -1 none. */
export function fitSource(grade: number, satisfaction: number): number {
  if (grade === grade) return satisfaction === satisfaction ? 0 : 1;
  return satisfaction === satisfaction ? 2 : -1;
}

function unit(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}
