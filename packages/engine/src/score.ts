import { Model, SignalData } from './model';
import { SimilarityWorkspace } from './similarity';
import { Basis, Confidence, Scale, Settings, Signal } from './types';

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
}

function allocScores(n: number): SignalScores {
  return {
    value: new Float64Array(n),
    kin: new Int32Array(n),
    basis: new Uint8Array(n),
    spread: new Float64Array(n),
    confidence: new Uint8Array(n),
  };
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

const BUCKETS = 1024;
/** Below this much scanning, scan directly when walking every candidate would cost more. */
const WALK_FIRST_MIN = 20_000;

/**
 * Scores one student over a list of courses: neighbourhoods, predictions, basis and spread,
 * for one or both signals from the same similarities. One Scorer per thread; not reentrant.
 *
 * Neighbourhoods are the k best candidates by (w descending, student key ascending). Two exact
 * routes give the same sets: walking candidates best-first and filling every course at once
 * (cheap for popular courses), and scanning a course's students with a small heap (cheap for
 * rare ones). The scorer walks while walking is cheaper than scanning what is left unfilled.
 */
export class Scorer {
  readonly ws: SimilarityWorkspace;
  readonly out: Record<Signal, SignalScores>;
  /** Neighbourhoods of the last call: target t, signal s -> slots [t*k, t*k + fill). */
  slotStudent: Record<Signal, Int32Array>;
  slotW: Record<Signal, Float64Array>;
  slotValue: Record<Signal, Float64Array>;
  fill: Record<Signal, Int32Array>;
  k = 0;
  /** Work of the last call (entries visited), for benchmarks. */
  stats = { candidates: 0, walked: 0, scanned: 0 };
  private cap = 0;
  private readonly cand: Int32Array;
  private readonly sorted: Int32Array;
  private readonly courseTarget: Int32Array;
  private readonly bucketStart = new Int32Array(BUCKETS + 1);
  private hIdx = new Int32Array(0);
  private hW = new Float64Array(0);
  private hVal = new Float64Array(0);

  constructor(readonly model: Model) {
    this.ws = new SimilarityWorkspace(model);
    const S = model.studentKeys.length;
    this.cand = new Int32Array(S);
    this.sorted = new Int32Array(S);
    this.courseTarget = new Int32Array(model.courseKeys.length).fill(-1);
    this.out = { grade: allocScores(0), satisfaction: allocScores(0) };
    this.slotStudent = { grade: new Int32Array(0), satisfaction: new Int32Array(0) };
    this.slotW = { grade: new Float64Array(0), satisfaction: new Float64Array(0) };
    this.slotValue = { grade: new Float64Array(0), satisfaction: new Float64Array(0) };
    this.fill = { grade: new Int32Array(0), satisfaction: new Int32Array(0) };
  }

  private ensure(T: number, k: number, signals: readonly Signal[]): void {
    if (T > this.cap || k !== this.k) {
      this.cap = Math.max(T, this.cap);
      this.k = k;
      for (const s of ['grade', 'satisfaction'] as const) {
        this.out[s] = allocScores(this.cap);
        this.slotStudent[s] = new Int32Array(this.cap * k);
        this.slotW[s] = new Float64Array(this.cap * k);
        this.slotValue[s] = new Float64Array(this.cap * k);
        this.fill[s] = new Int32Array(this.cap);
      }
      this.hIdx = new Int32Array(k);
      this.hW = new Float64Array(k);
      this.hVal = new Float64Array(k);
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
    const model = this.model;
    const T = targets.length;
    const k = Math.max(0, Math.floor(settings.k));
    this.ensure(T, k, signals);
    const ws = this.ws;
    ws.compute(a, settings, false);
    const w = ws.w;
    const rank = model.studentRank;
    const minSim = settings.minSimilarity;
    const nc =
      minSim < 0
        ? // Students sharing nothing have w = 0, which passes a negative threshold.
          collectAll(model.studentKeys.length, w, a, minSim, this.cand)
        : collectCandidates(ws.touched, ws.nTouched, w, a, minSim, this.cand);

    const courseTarget = this.courseTarget;
    for (let t = 0; t < T; t++) {
      const j = targets[t];
      if (j >= 0 && courseTarget[j] < 0) courseTarget[j] = t;
    }
    let remainingScan = 0;
    let remainingWalk = 0;
    for (const s of signals) {
      const fill = this.fill[s];
      const d = model.signals[s];
      fill.fill(0, 0, T);
      if (k > 0) remainingScan += scanCost(targets, courseTarget, d.colPtr);
      remainingWalk += rowLengthSum(this.cand, nc, d.rowPtr);
    }

    this.stats.candidates = nc;
    this.stats.walked = 0;
    this.stats.scanned = 0;
    const walkedAll = this.walk(nc, remainingWalk, remainingScan, signals);

    // Scan what the walk left unfilled.
    if (!walkedAll) {
      for (const s of signals) {
        const fill = this.fill[s];
        const d = model.signals[s];
        for (let t = 0; t < T; t++) {
          const j = targets[t];
          if (j < 0 || courseTarget[j] !== t || fill[t] >= k) continue;
          if (d.colPtr[j + 1] === d.colPtr[j]) continue;
          fill[t] = this.scanCourse(d, j, a, minSim, w, rank, k, s, t);
          this.stats.scanned += d.colPtr[j + 1] - d.colPtr[j];
        }
      }
    }

    for (const s of signals) {
      const d = model.signals[s];
      const scale = model.scales[s];
      const o = this.out[s];
      predictFromSlots(
        d,
        a,
        targets,
        courseTarget,
        this.fill[s],
        k,
        Math.max(1, settings.minNeighbours),
        this.slotStudent[s],
        this.slotW[s],
        this.slotValue[s],
        // Plain numbers, not scale objects: one shape for the optimiser.
        scale ? scale.min : -Infinity,
        scale ? scale.max : Infinity,
        (scale ?? DEFAULT_SCALES[s]).max - (scale ?? DEFAULT_SCALES[s]).min,
        o.value,
        o.kin,
        o.basis,
        o.spread,
        o.confidence,
      );
    }
    for (let t = 0; t < T; t++) if (targets[t] >= 0) courseTarget[targets[t]] = -1;
  }

  /** Best-first walk over candidates. Returns true when every neighbourhood is final. */
  private walk(
    nc: number,
    remainingWalk: number,
    remainingScan: number,
    signals: readonly Signal[],
  ): boolean {
    if (nc === 0 || remainingScan === 0) return true;
    // Scanning everything is cheaper than walking every candidate: no walk at all.
    if (remainingScan <= remainingWalk && remainingScan <= WALK_FIRST_MIN) return false;
    let walked = 0;
    const model = this.model;
    const w = this.ws.w;
    const rank = model.studentRank;
    const k = this.k;
    const sorted = this.sorted;
    const bs = this.bucketStart;
    bucketByWeight(this.cand, nc, w, sorted, bs);
    const order = (x: number, y: number): number => w[y] - w[x] || rank[x] - rank[y];
    const s0 = signals[0];
    const s1 = signals.length > 1 ? signals[1] : signals[0];
    const two = signals.length > 1;
    const d0 = model.signals[s0];
    const d1 = model.signals[s1];
    const courseTarget = this.courseTarget;
    for (let b = 0; b < BUCKETS; b++) {
      const start = bs[b];
      const end = bs[b + 1];
      if (end - start > 1) sorted.subarray(start, end).sort(order);
      for (let c = start; c < end; c++) {
        if (remainingScan === 0) return true;
        // Walk until the walk has cost as much as scanning what is left (within 2x of the
        // best stopping point), then scan the rest.
        this.stats.walked = walked;
        if (walked >= remainingScan) return false;
        const i = sorted[c];
        const wi = w[i];
        walked += d0.rowPtr[i + 1] - d0.rowPtr[i];
        remainingScan -= walkRow(
          d0.rowPtr,
          d0.rowCourse,
          d0.rowValue,
          d0.colPtr,
          i,
          wi,
          courseTarget,
          this.fill[s0],
          k,
          this.slotStudent[s0],
          this.slotW[s0],
          this.slotValue[s0],
        );
        if (two) {
          walked += d1.rowPtr[i + 1] - d1.rowPtr[i];
          remainingScan -= walkRow(
            d1.rowPtr,
            d1.rowCourse,
            d1.rowValue,
            d1.colPtr,
            i,
            wi,
            courseTarget,
            this.fill[s1],
            k,
            this.slotStudent[s1],
            this.slotW[s1],
            this.slotValue[s1],
          );
        }
      }
    }
    return true;
  }

  /** Top-k of one course by (w desc, key asc), written best first into the slots. */
  private scanCourse(
    d: SignalData,
    j: number,
    a: number,
    minSim: number,
    w: Float64Array,
    rank: Int32Array,
    k: number,
    s: Signal,
    t: number,
  ): number {
    return scanTopK(
      d.colStudent,
      d.colValue,
      d.colPtr[j],
      d.colPtr[j + 1],
      a,
      minSim,
      w,
      rank,
      k,
      this.hIdx,
      this.hW,
      this.hVal,
      this.slotStudent[s],
      this.slotW[s],
      this.slotValue[s],
      t * k,
    );
  }
}

function collectCandidates(
  touched: Int32Array,
  nTouched: number,
  w: Float64Array,
  a: number,
  minSim: number,
  cand: Int32Array,
): number {
  let nc = 0;
  for (let t = 0; t < nTouched; t++) {
    const i = touched[t];
    if (i !== a && w[i] > minSim) cand[nc++] = i;
  }
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
  for (let i = 0; i < S; i++) if (i !== a && w[i] > minSim) cand[nc++] = i;
  return nc;
}

function scanCost(
  targets: ArrayLike<number>,
  courseTarget: Int32Array,
  colPtr: Int32Array,
): number {
  let sum = 0;
  for (let t = 0; t < targets.length; t++) {
    const j = targets[t];
    if (j >= 0 && courseTarget[j] === t) sum += colPtr[j + 1] - colPtr[j];
  }
  return sum;
}

function rowLengthSum(cand: Int32Array, nc: number, rowPtr: Int32Array): number {
  let sum = 0;
  for (let c = 0; c < nc; c++) sum += rowPtr[cand[c] + 1] - rowPtr[cand[c]];
  return sum;
}

/** Counting sort of candidates into buckets of w, best bucket first. */
function bucketByWeight(
  cand: Int32Array,
  nc: number,
  w: Float64Array,
  sorted: Int32Array,
  bs: Int32Array,
): void {
  let lo = Infinity;
  let hi = -Infinity;
  for (let c = 0; c < nc; c++) {
    const x = w[cand[c]];
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  bs.fill(0);
  const scale = hi > lo ? (BUCKETS - 1) / (hi - lo) : 0;
  for (let c = 0; c < nc; c++) bs[Math.floor((hi - w[cand[c]]) * scale) + 1]++;
  for (let b = 0; b < BUCKETS; b++) bs[b + 1] += bs[b];
  const pos = bs.slice(0, BUCKETS);
  for (let c = 0; c < nc; c++) {
    const i = cand[c];
    sorted[pos[Math.floor((hi - w[i]) * scale)]++] = i;
  }
}

/**
 * Add candidate i to the neighbourhood of every target course in its row that still has room.
 * Returns the scan cost that no longer needs doing (courses that just filled).
 */
function walkRow(
  rowPtr: Int32Array,
  rowCourse: Int32Array,
  rowValue: Float64Array,
  colPtr: Int32Array,
  i: number,
  wi: number,
  courseTarget: Int32Array,
  fill: Int32Array,
  k: number,
  stu: Int32Array,
  sw: Float64Array,
  val: Float64Array,
): number {
  let saved = 0;
  const e = rowPtr[i + 1];
  for (let p = rowPtr[i]; p < e; p++) {
    const j = rowCourse[p];
    const t = courseTarget[j];
    if (t < 0) continue;
    const f = fill[t];
    if (f >= k) continue;
    const slot = t * k + f;
    stu[slot] = i;
    sw[slot] = wi;
    val[slot] = rowValue[p];
    fill[t] = f + 1;
    if (f + 1 === k) saved += colPtr[j + 1] - colPtr[j];
  }
  return saved;
}

/** The mean-centred weighted prediction (or the baseline) for every target of one signal. */
function predictFromSlots(
  d: SignalData,
  a: number,
  targets: ArrayLike<number>,
  courseTarget: Int32Array,
  fill: Int32Array,
  k: number,
  need: number,
  sStu: Int32Array,
  sW: Float64Array,
  sVal: Float64Array,
  lo: number,
  hi: number,
  width: number,
  value: Float64Array,
  kin: Int32Array,
  basis: Uint8Array,
  spreadOut: Float64Array,
  confidence: Uint8Array,
): void {
  const mean = d.mean;
  const ma = a >= 0 ? mean[a] : d.globalMean;
  const T = targets.length;
  for (let t = 0; t < T; t++) {
    const j = targets[t];
    const t0 = j >= 0 ? courseTarget[j] : t;
    if (t0 !== t) {
      // A repeated course: copy the first answer.
      value[t] = value[t0];
      kin[t] = kin[t0];
      basis[t] = basis[t0];
      spreadOut[t] = spreadOut[t0];
      confidence[t] = confidence[t0];
      fill[t] = fill[t0];
      continue;
    }
    const n = j >= 0 ? fill[t] : 0;
    kin[t] = n;
    if (n >= need) {
      let num = 0;
      let den = 0;
      const base = t * k;
      for (let q = base; q < base + n; q++) {
        const wi = sW[q];
        num += wi * (sVal[q] - mean[sStu[q]]);
        den += Math.abs(wi);
      }
      const dev = den > 0 ? num / den : 0;
      // Weighted spread of deviations around their weighted mean; equal weights if all w = 0.
      let m = 0;
      let tot = 0;
      for (let q = base; q < base + n; q++) {
        const u = den > 0 ? Math.abs(sW[q]) : 1;
        m += u * (sVal[q] - mean[sStu[q]]);
        tot += u;
      }
      m /= tot;
      let v = 0;
      for (let q = base; q < base + n; q++) {
        const u = den > 0 ? Math.abs(sW[q]) : 1;
        const e = sVal[q] - mean[sStu[q]] - m;
        v += u * e * e;
      }
      const spread = Math.sqrt(v / tot);
      const p = ma + dev;
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
    }
  }
}

/**
 * Heap selection over one course column: the heap's root is the worst kept by the order
 * (w descending, key rank ascending). Monomorphic and closure-free because it is the hot loop.
 */
function scanTopK(
  colStudent: Int32Array,
  colValue: Float64Array,
  from: number,
  to: number,
  a: number,
  minSim: number,
  w: Float64Array,
  rank: Int32Array,
  k: number,
  hIdx: Int32Array,
  hW: Float64Array,
  hVal: Float64Array,
  outIdx: Int32Array,
  outW: Float64Array,
  outVal: Float64Array,
  base: number,
): number {
  let n = 0;
  for (let q = from; q < to; q++) {
    const i = colStudent[q];
    const wi = w[i];
    if (!(wi > minSim) || i === a) continue;
    if (n < k) {
      let c = n++;
      const ri = rank[i];
      while (c > 0) {
        const p = (c - 1) >> 1;
        const wp = hW[p];
        // Move up while the new entry is worse than its parent.
        if (!(wi < wp || (wi === wp && ri > rank[hIdx[p]]))) break;
        hIdx[c] = hIdx[p];
        hW[c] = wp;
        hVal[c] = hVal[p];
        c = p;
      }
      hIdx[c] = i;
      hW[c] = wi;
      hVal[c] = colValue[q];
    } else {
      const w0 = hW[0];
      if (wi < w0 || (wi === w0 && rank[i] > rank[hIdx[0]])) continue;
      siftDown(hIdx, hW, hVal, n, i, wi, colValue[q], rank);
    }
  }
  // Pop the worst to the back: the slots end up best first.
  for (let m = n - 1; m >= 0; m--) {
    outIdx[base + m] = hIdx[0];
    outW[base + m] = hW[0];
    outVal[base + m] = hVal[0];
    if (m > 0) siftDown(hIdx, hW, hVal, m, hIdx[m], hW[m], hVal[m], rank);
  }
  return n;
}

/** Put (i, wi, v) at the root of a heap of size n and restore the heap. */
function siftDown(
  hIdx: Int32Array,
  hW: Float64Array,
  hVal: Float64Array,
  n: number,
  i: number,
  wi: number,
  v: number,
  rank: Int32Array,
): void {
  const ri = rank[i];
  let c = 0;
  for (;;) {
    const l = 2 * c + 1;
    if (l >= n) break;
    const r = l + 1;
    let m = l;
    if (r < n) {
      const wr = hW[r];
      const wl = hW[l];
      if (wr < wl || (wr === wl && rank[hIdx[r]] > rank[hIdx[l]])) m = r;
    }
    const wm = hW[m];
    // Stop when the child is not worse than the entry.
    if (!(wm < wi || (wm === wi && rank[hIdx[m]] > ri))) break;
    hIdx[c] = hIdx[m];
    hW[c] = wm;
    hVal[c] = hVal[m];
    c = m;
  }
  hIdx[c] = i;
  hW[c] = wi;
  hVal[c] = v;
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
  const g =
    grade === grade ? unit((grade - gradeScale.min) / (gradeScale.max - gradeScale.min)) : NaN;
  const s =
    satisfaction === satisfaction
      ? unit((satisfaction - satScale.min) / (satScale.max - satScale.min))
      : NaN;
  if (g === g && s === s) return [100 * (alpha * g + (1 - alpha) * s), 0];
  if (g === g) return [100 * g, 1];
  if (s === s) return [100 * s, 2];
  return [NaN, -1];
}

function unit(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}
