import {
  componentsOf,
  DenseBlock,
  Model,
  SimilarityComponent,
  similarityView,
  SimilarityView,
} from './model';
import { Settings, SimilaritySource } from './types';

const POW10: number[] = Array.from({ length: 340 }, (_, e) => Number(`1e${e}`));

/**
 * x rounded to `digits` significant digits (digits >= 1), so that values equal in exact
 * arithmetic but apart in the last bits become equal.
 */
export function roundSignificant(x: number, digits: number): number {
  if (x === 0 || x !== x) return x;
  const m = x < 0 ? -x : x;
  // 10^-e <= m < 10^(1-e) for similarities (|w| <= 1); larger values take the general route.
  if (m >= 1) {
    const e = Math.floor(Math.log10(m)) + 1 - digits;
    if (e <= 0) return Math.round(x * POW10[-e]) / POW10[-e];
    return Math.round(x / POW10[e]) * POW10[e];
  }
  let e = 1;
  while (e < 300 && m < 1 / POW10[e]) e++;
  // Far below any similarity's resolution, where the scale would pass the largest double:
  // nothing to round.
  if (digits - 1 + e > 300) return x;
  const sc = POW10[digits - 1 + e];
  return Math.round(x * sc) / sc;
}

/**
 * Scratch arrays for one student's similarities, sized to the model and reused across calls
 * (one per thread). After `compute`, `w[i]` holds w(a, i) for every student (0 when nothing is
 * shared) and `touched[0..nTouched)` lists the students that share a weighted course with a.
 */
export class SimilarityWorkspace {
  readonly w: Float64Array;
  readonly overlap: Int32Array;
  readonly touched: Int32Array;
  nTouched = 0;
  /** Courses of a with f_j = 0: every student with a value has them, so they add to every overlap. */
  zeroCourses = 0;
  student = -1;
  view: SimilarityView | null = null;
  /** Scratch for sources that combine similarities or shrink them (made on first use). */
  private acc: Float64Array | null = null;
  private cnt: Int32Array | null = null;
  private mark: Int32Array | null = null;
  private list: Int32Array | null = null;
  private stamp = 0;
  /**
   * True when the last compute took the dense route: then w is set for every student and
   * touched is not filled (every student counts as touched).
   */
  dense = false;
  private readonly num: Float64Array;
  private readonly da: Float64Array;
  private readonly di: Float64Array;
  private readonly seen: Int32Array;
  private epoch = 0;
  private runSlot = new Int32Array(12);
  private runCoef = new Float64Array(12);

  constructor(public model: Model) {
    const S = model.studentKeys.length;
    this.w = new Float64Array(S);
    this.overlap = new Int32Array(S);
    this.touched = new Int32Array(S);
    this.num = new Float64Array(S);
    this.da = new Float64Array(S);
    this.di = new Float64Array(S);
    this.seen = new Int32Array(S);
  }

  /** Overlap |I_a ∩ I_i| in the similarity signal, valid after compute(..., true). */
  overlapOf(i: number): number {
    if (this.seen[i] === this.epoch) return this.overlap[i] + this.zeroCourses;
    const d = this.view?.data;
    return d && d.rowPtr[i + 1] > d.rowPtr[i] ? this.zeroCourses : 0;
  }

  /**
   * The similarities of a source (method.md): the components' cosines averaged, then
   * significance weighting and shrinkage with n the largest co-rated count among the
   * components, then rounding for ranking. A single component without shrinkage or rounding
   * is `compute` itself.
   */
  computeSource(
    a: number,
    settings: Settings,
    source: SimilaritySource,
    needOverlap: boolean,
  ): void {
    const comps = componentsOf(source);
    if (comps.length === 1 && settings.shrinkage === 0 && settings.tieDigits === 0) {
      this.compute(a, settings, needOverlap, comps[0]);
      return;
    }
    const S = this.model.studentKeys.length;
    if (!this.acc || this.acc.length !== S) {
      this.acc = new Float64Array(S);
      this.cnt = new Int32Array(S);
      this.mark = new Int32Array(S);
      this.list = new Int32Array(S);
      this.stamp = 0;
    }
    const acc = this.acc;
    const cnt = this.cnt as Int32Array;
    const mark = this.mark as Int32Array;
    const list = this.list as Int32Array;
    this.stamp++;
    if (this.stamp > 0x3fffffff) {
      mark.fill(0);
      this.stamp = 1;
    }
    const stamp = this.stamp;
    const plain = settings.significance === 0 ? settings : { ...settings, significance: 0 };
    let nList = 0;
    const { w, touched } = this;
    for (const c of comps) {
      this.compute(a, plain, true, c);
      for (let t = 0; t < this.nTouched; t++) {
        const i = touched[t];
        if (mark[i] !== stamp) {
          mark[i] = stamp;
          list[nList++] = i;
          acc[i] = 0;
          cnt[i] = 0;
        }
        acc[i] += w[i];
        const o = this.overlapOf(i);
        if (o > cnt[i]) cnt[i] = o;
      }
    }
    for (let t = 0; t < this.nTouched; t++) w[touched[t]] = 0;
    const m = comps.length;
    const g = settings.significance;
    const beta = settings.shrinkage;
    const digits = settings.tieDigits;
    const epoch = this.epoch;
    for (let x = 0; x < nList; x++) {
      const i = list[x];
      const n = cnt[i];
      let v = m === 1 ? acc[i] : acc[i] / m;
      if (g > 0) v *= Math.min(n, g) / g;
      if (beta > 0) v *= n / (n + beta);
      if (digits > 0) v = roundSignificant(v, digits);
      w[i] = i === a ? 0 : v;
      touched[x] = i;
      this.overlap[i] = n;
      this.seen[i] = epoch;
    }
    this.nTouched = nList;
    this.zeroCourses = 0;
  }

  /**
   * Similarities of student a (index, or -1 for a student without records) to everyone, from
   * one component.
   */
  compute(
    a: number,
    settings: Settings,
    needOverlap: boolean,
    component: SimilarityComponent,
  ): void {
    const { w, touched } = this;
    if (this.dense) w.fill(0);
    else for (let t = 0; t < this.nTouched; t++) w[touched[t]] = 0;
    this.dense = false;
    this.nTouched = 0;
    this.zeroCourses = 0;
    this.student = a;
    this.epoch++;
    if (this.epoch > 0x3fffffff) {
      this.seen.fill(0);
      this.epoch = 1;
    }
    const view = similarityView(this.model, component, settings);
    this.view = view;
    if (a < 0) return;
    if (settings.significance > 0) needOverlap = true;
    const { data, f, rowX, colX, norm } = view;
    // Enrolment is 0/1: always cosine.
    const pearson = settings.similarity === 'pearson' && component !== 'enrolment';
    if (
      !pearson &&
      !needOverlap &&
      hasDenseTerm(data.rowPtr, data.rowCourse, f, rowX, view.dense, a)
    ) {
      this.dense = true;
      const S = this.model.studentKeys.length;
      if (view.dense.width > this.runSlot.length) {
        this.runSlot = new Int32Array(view.dense.width);
        this.runCoef = new Float64Array(view.dense.width);
      }
      this.zeroCourses = accumulateCosineDense(
        data.rowPtr,
        data.rowCourse,
        data.colPtr,
        data.colStudent,
        f,
        rowX,
        colX,
        a,
        view.dense.slot,
        view.dense.width,
        view.dense.x,
        this.runSlot,
        this.runCoef,
        this.num,
        S,
      );
      finishDense(a, S, this.num, norm, this.w);
      return;
    }
    const acc = pearson ? accumulatePearson : accumulateCosine;
    const packed = acc(
      data.rowPtr,
      data.rowCourse,
      data.colPtr,
      data.colStudent,
      f,
      rowX,
      colX,
      a,
      needOverlap,
      this.seen,
      this.epoch,
      this.touched,
      this.num,
      this.da,
      this.di,
      this.overlap,
    );
    // The accumulators return touched count * 2^20 + zero-IUF course count.
    const n = Math.floor(packed / 1048576);
    this.zeroCourses = packed - n * 1048576;
    this.nTouched = n;
    finish(
      pearson,
      a,
      n,
      this.touched,
      this.num,
      this.da,
      this.di,
      this.overlap,
      norm,
      settings.significance,
      this.zeroCourses,
      this.w,
    );
  }
}

// The hot loops live in plain functions over typed arrays so the optimiser sees one shape.

/** Whether a has a course kept dense that adds a term (f_j and x_aj both non-zero). */
function hasDenseTerm(
  rowPtr: Int32Array,
  rowCourse: Int32Array,
  f: Float64Array,
  rowX: Float64Array,
  dense: DenseBlock,
  a: number,
): boolean {
  if (dense.width === 0) return false;
  for (let p = rowPtr[a]; p < rowPtr[a + 1]; p++) {
    const j = rowCourse[p];
    if (dense.slot[j] >= 0 && f[j] !== 0 && rowX[p] !== 0) return true;
  }
  return false;
}

/**
 * Cosine numerators for every student. Terms are added in a's course order, exactly as the
 * sparse route adds them (adding a zero term for a course i lacks leaves the sum unchanged),
 * so both routes give the same bits. Runs of consecutive dense courses share one pass.
 */
function accumulateCosineDense(
  rowPtr: Int32Array,
  rowCourse: Int32Array,
  colPtr: Int32Array,
  colStudent: Int32Array,
  f: Float64Array,
  rowX: Float64Array,
  colX: Float64Array,
  a: number,
  slot: Int32Array,
  width: number,
  dx: Float64Array,
  runSlot: Int32Array,
  runCoef: Float64Array,
  num: Float64Array,
  S: number,
): number {
  num.fill(0, 0, S);
  let zero = 0;
  const e = rowPtr[a + 1];
  let p = rowPtr[a];
  while (p < e) {
    const j = rowCourse[p];
    const fj = f[j];
    if (fj === 0) {
      zero++;
      p++;
      continue;
    }
    const xa = rowX[p];
    if (xa === 0) {
      p++;
      continue;
    }
    if (slot[j] < 0) {
      const c = fj * fj * xa;
      const end = colPtr[j + 1];
      for (let q = colPtr[j]; q < end; q++) num[colStudent[q]] += c * colX[q];
      p++;
      continue;
    }
    // Gather the run of dense courses that starts here (skipping courses that add nothing).
    let m = 0;
    while (p < e) {
      const jj = rowCourse[p];
      const ff = f[jj];
      if (ff === 0) {
        zero++;
        p++;
        continue;
      }
      const xx = rowX[p];
      if (xx === 0) {
        p++;
        continue;
      }
      if (slot[jj] < 0) break;
      runSlot[m] = slot[jj];
      runCoef[m] = ff * ff * xx;
      m++;
      p++;
    }
    denseRun(num, dx, width, S, runSlot, runCoef, m);
  }
  return zero;
}

function denseRun(
  num: Float64Array,
  dx: Float64Array,
  width: number,
  S: number,
  runSlot: Int32Array,
  runCoef: Float64Array,
  m: number,
): void {
  if (m === 0) return;
  if (m <= UNROLLED) return denseRunUnrolled(num, dx, width, S, runSlot, runCoef, m);
  for (let i = 0, b = 0; i < S; i++, b += width) {
    let s = num[i];
    for (let u = 0; u < m; u++) s += runCoef[u] * dx[b + runSlot[u]];
    num[i] = s;
  }
}

const UNROLLED = 12;

/**
 * denseRun for runs of up to 12 courses, slots and coefficients in locals. Terms are added in
 * run order, exactly as the loop above adds them.
 */
function denseRunUnrolled(
  num: Float64Array,
  dx: Float64Array,
  width: number,
  S: number,
  r: Int32Array,
  c: Float64Array,
  m: number,
): void {
  // The scratch arrays hold at least 12 entries; those past m are never read in the loop.
  const [r0, r1, r2, r3, r4, r5, r6, r7, r8, r9, r10, r11] = r;
  const [c0, c1, c2, c3, c4, c5, c6, c7, c8, c9, c10, c11] = c;
  for (let i = 0, b = 0; i < S; i++, b += width) {
    let s = num[i] + c0 * dx[b + r0];
    if (m > 1) s += c1 * dx[b + r1];
    if (m > 2) s += c2 * dx[b + r2];
    if (m > 3) s += c3 * dx[b + r3];
    if (m > 4) s += c4 * dx[b + r4];
    if (m > 5) s += c5 * dx[b + r5];
    if (m > 6) s += c6 * dx[b + r6];
    if (m > 7) s += c7 * dx[b + r7];
    if (m > 8) s += c8 * dx[b + r8];
    if (m > 9) s += c9 * dx[b + r9];
    if (m > 10) s += c10 * dx[b + r10];
    if (m > 11) s += c11 * dx[b + r11];
    num[i] = s;
  }
}

/** w for every student from the numerators (cosine, no significance weighting). */
function finishDense(
  a: number,
  S: number,
  num: Float64Array,
  norm: Float64Array,
  w: Float64Array,
): void {
  const na = norm[a];
  for (let i = 0; i < S; i++) {
    let s = 0;
    const den = na * norm[i];
    if (den > 0) s = num[i] / den;
    if (s > 1) s = 1;
    else if (s < -1) s = -1;
    w[i] = s;
  }
  w[a] = 0;
}

function accumulateCosine(
  rowPtr: Int32Array,
  rowCourse: Int32Array,
  colPtr: Int32Array,
  colStudent: Int32Array,
  f: Float64Array,
  rowX: Float64Array,
  colX: Float64Array,
  a: number,
  needOverlap: boolean,
  seen: Int32Array,
  epoch: number,
  touched: Int32Array,
  num: Float64Array,
  _da: Float64Array,
  _di: Float64Array,
  overlap: Int32Array,
): number {
  let n = 0;
  let zero = 0;
  for (let p = rowPtr[a]; p < rowPtr[a + 1]; p++) {
    const j = rowCourse[p];
    const fj = f[j];
    // A course everyone has (f_j = 0) adds nothing to any sum; count it for overlaps only.
    if (fj === 0) {
      zero++;
      continue;
    }
    const xa = rowX[p];
    if (xa === 0 && !needOverlap) continue;
    const c = fj * fj * xa;
    const end = colPtr[j + 1];
    for (let q = colPtr[j]; q < end; q++) {
      const i = colStudent[q];
      if (seen[i] !== epoch) {
        seen[i] = epoch;
        touched[n++] = i;
        num[i] = 0;
        overlap[i] = 0;
      }
      num[i] += c * colX[q];
      overlap[i]++;
    }
  }
  return n * 1048576 + zero;
}

function accumulatePearson(
  rowPtr: Int32Array,
  rowCourse: Int32Array,
  colPtr: Int32Array,
  colStudent: Int32Array,
  f: Float64Array,
  rowX: Float64Array,
  colX: Float64Array,
  a: number,
  _needOverlap: boolean,
  seen: Int32Array,
  epoch: number,
  touched: Int32Array,
  num: Float64Array,
  da: Float64Array,
  di: Float64Array,
  overlap: Int32Array,
): number {
  let n = 0;
  let zero = 0;
  for (let p = rowPtr[a]; p < rowPtr[a + 1]; p++) {
    const j = rowCourse[p];
    const fj = f[j];
    if (fj === 0) {
      zero++;
      continue;
    }
    const xa = rowX[p];
    const c = fj * xa;
    const caa = c * xa;
    const end = colPtr[j + 1];
    for (let q = colPtr[j]; q < end; q++) {
      const i = colStudent[q];
      if (seen[i] !== epoch) {
        seen[i] = epoch;
        touched[n++] = i;
        num[i] = 0;
        da[i] = 0;
        di[i] = 0;
        overlap[i] = 0;
      }
      const xi = colX[q];
      num[i] += c * xi;
      da[i] += caa;
      di[i] += fj * xi * xi;
      overlap[i]++;
    }
  }
  return n * 1048576 + zero;
}

function finish(
  pearson: boolean,
  a: number,
  n: number,
  touched: Int32Array,
  num: Float64Array,
  da: Float64Array,
  di: Float64Array,
  overlap: Int32Array,
  norm: Float64Array,
  g: number,
  zeroCourses: number,
  w: Float64Array,
): void {
  const na = norm[a];
  for (let t = 0; t < n; t++) {
    const i = touched[t];
    let s = 0;
    if (i !== a) {
      let den: number;
      if (pearson) {
        den = da[i] * di[i];
        if (den > 0) s = num[i] / Math.sqrt(den);
      } else {
        den = na * norm[i];
        if (den > 0) s = num[i] / den;
      }
      // Rounding can push a perfect match a hair past 1.
      if (s > 1) s = 1;
      else if (s < -1) s = -1;
      if (g > 0) s *= Math.min(overlap[i] + zeroCourses, g) / g;
    }
    w[i] = s;
  }
}
