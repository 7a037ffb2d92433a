import { scorerFor } from './api';
import { Model } from './model';
import { baselineValue, BASIS_NEIGHBOURS, DEFAULT_SCALES } from './score';
import { Confidence, Scale, Settings, Signal, SignalPrediction, StudentPrediction } from './types';

/**
 * Likely ranges (method.md, "Likely range"): split-conformal intervals from the residuals of a
 * backtest. Held-out cells are put in bins by the student's record count and the kin
 * strength (summed |w|); each bin keeps the 10 % and 90 % quantiles of truth - estimate, so
 * an estimate's 80 % range is [estimate + q10, estimate + q90], clamped to the scale.
 */
export const RANGE_LEVEL = 0.8;
/** Fewest held-out cells per bin; smaller bins are merged with a neighbour. */
export const RANGE_MIN_CELLS = 200;
/** Record-count groups and strength bins per group, at most. */
const RECORD_GROUPS = 4;
const STRENGTH_BINS = 3;

/**
 * Confidence from the range's width relative to the signal's scale: high when the 80 %
 * range spans at most 20 % of the scale (0.8 grade points on 0-4), medium up to 35 %, low
 * beyond (or without a range).
 */
export const RANGE_CONFIDENCE_RULE = { high: 0.2, medium: 0.35 } as const;
export const RANGE_CONFIDENCE_DESCRIPTION =
  'Confidence follows the width of the likely range, which comes from how far past estimates ' +
  'like this one (students with a similar number of records, kin of similar strength) were ' +
  'from the outcomes of the last completed term: high when the 80 % range spans at most 20 % ' +
  'of the scale, medium up to 35 %, low beyond. The fit score takes the lower confidence of ' +
  'the grade and satisfaction estimates.';

export interface RangeBin {
  /** Upper bound (inclusive) of the student's record count; Infinity for the last group. */
  maxRecords: number;
  /** Upper bound (inclusive) of the kin strength; Infinity for the last bin of a group. */
  maxStrength: number;
  /** Residual quantiles (truth - estimate). */
  low: number;
  high: number;
  /** Held-out cells behind the bin. */
  n: number;
}

export interface RangeTable {
  signal: Signal;
  /** The term whose outcomes the residuals came from. */
  term: string;
  bins: RangeBin[];
  scale: Scale;
}

/** One held-out cell of a backtest: the estimate, the truth and the bin features. */
export interface ResidualCells {
  estimate: Float64Array;
  truth: Float64Array;
  records: Int32Array;
  strength: Float64Array;
}

function quantile(sorted: Float64Array, q: number): number {
  // Type-7 (linear) quantile.
  if (sorted.length === 0) return NaN;
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** Split an ascending key list into at most `parts` runs of at least `min` cells, at key changes. */
function cuts(keys: Float64Array, parts: number, min: number): number[] {
  const n = keys.length;
  const out: number[] = [];
  if (n < 2 * min || parts < 2) return [n];
  let start = 0;
  for (let p = 1; p < parts; p++) {
    let at = Math.max(start + min, Math.round((n * p) / parts));
    // Keep equal keys in one run.
    while (at < n && keys[at] === keys[at - 1]) at++;
    if (at > n - min) break;
    out.push(at);
    start = at;
  }
  out.push(n);
  return out;
}

/** Bins and quantiles from a backtest's residuals. */
export function rangeTable(
  cells: ResidualCells,
  signal: Signal,
  term: string,
  scale: Scale,
): RangeTable {
  const n = cells.truth.length;
  const order = Array.from({ length: n }, (_, i) => i).sort(
    (x, y) => cells.records[x] - cells.records[y] || cells.strength[x] - cells.strength[y],
  );
  const recKeys = Float64Array.from(order, (i) => cells.records[i]);
  const bins: RangeBin[] = [];
  let from = 0;
  const groups = cuts(recKeys, RECORD_GROUPS, RANGE_MIN_CELLS * 2);
  groups.forEach((to, g) => {
    const idx = order.slice(from, to).sort((x, y) => cells.strength[x] - cells.strength[y]);
    const sKeys = Float64Array.from(idx, (i) => cells.strength[i]);
    let s0 = 0;
    const parts = cuts(sKeys, STRENGTH_BINS, RANGE_MIN_CELLS);
    parts.forEach((s1, b) => {
      const res = Float64Array.from(
        idx.slice(s0, s1),
        (i) => cells.truth[i] - cells.estimate[i],
      ).sort();
      bins.push({
        maxRecords: g === groups.length - 1 ? Infinity : recKeys[to - 1],
        maxStrength: b === parts.length - 1 ? Infinity : sKeys[s1 - 1],
        low: quantile(res, (1 - RANGE_LEVEL) / 2),
        high: quantile(res, 1 - (1 - RANGE_LEVEL) / 2),
        n: s1 - s0,
      });
      s0 = s1;
    });
    from = to;
  });
  return { signal, term, bins, scale };
}

/** The bin of an estimate: the first record group that holds the count, then the strength. */
export function rangeBin(table: RangeTable, records: number, strength: number): RangeBin | null {
  let group = Infinity;
  for (const b of table.bins) {
    if (records <= b.maxRecords) {
      group = b.maxRecords;
      break;
    }
  }
  for (const b of table.bins) {
    if (b.maxRecords === group && strength <= b.maxStrength) return b;
  }
  return null;
}

export interface LikelyRange {
  low: number;
  high: number;
  confidence: Confidence;
}

/** An estimate's likely range and the confidence its width gives. */
export function likelyRange(
  table: RangeTable | null | undefined,
  estimate: number,
  records: number,
  strength: number,
): LikelyRange | null {
  if (!table || estimate !== estimate) return null;
  const b = rangeBin(table, records, strength);
  if (!b || b.low !== b.low) return null;
  const { min, max } = table.scale;
  const low = Math.min(max, Math.max(min, estimate + b.low));
  const high = Math.min(max, Math.max(min, estimate + b.high));
  return { low, high, confidence: confidenceOfWidth(high - low, table.scale) };
}

export function confidenceOfWidth(width: number, scale: Scale): Confidence {
  const rel = width / (scale.max - scale.min);
  if (rel <= RANGE_CONFIDENCE_RULE.high) return 'high';
  if (rel <= RANGE_CONFIDENCE_RULE.medium) return 'medium';
  return 'low';
}

/**
 * Estimates for held-out cells (students grouped together), with the bin features: the
 * student's values in the signal before the term and the kin strength.
 */
export function residualCells(
  model: Model,
  signal: Signal,
  test: { student: Int32Array; course: Int32Array; truth: Float64Array },
  settings: Settings,
): ResidualCells {
  const scorer = scorerFor(model);
  const d = model.signals[signal];
  const scale = model.scales[signal] ?? DEFAULT_SCALES[signal];
  const n = test.student.length;
  const out: ResidualCells = {
    estimate: new Float64Array(n),
    truth: Float64Array.from(test.truth),
    records: new Int32Array(n),
    strength: new Float64Array(n),
  };
  let x = 0;
  while (x < n) {
    const a = test.student[x];
    let y = x;
    while (y < n && test.student[y] === a) y++;
    const targets = test.course.subarray(x, y);
    scorer.score(a, targets, settings, [signal]);
    const o = scorer.out[signal];
    for (let t = 0; t < targets.length; t++) {
      let v = o.value[t];
      if (v !== v) v = baselineValue(d, a, targets[t], model.scales[signal]);
      if (v !== v) v = Math.min(scale.max, Math.max(scale.min, d.globalMean));
      out.estimate[x + t] = v;
      out.records[x + t] = d.rowPtr[a + 1] - d.rowPtr[a];
      out.strength[x + t] = o.basis[t] === BASIS_NEIGHBOURS ? o.strength[t] : 0;
    }
    x = y;
  }
  return out;
}

const LEVEL: Record<Confidence, number> = { low: 0, medium: 1, high: 2 };

/**
 * The prediction with likely ranges: each signal's range and the confidence its width gives
 * (low without a range); the fit takes the lower confidence of the signals it rests on.
 */
export function applyRanges(
  model: Model,
  prediction: StudentPrediction,
  tables: Partial<Record<Signal, RangeTable>> | null | undefined,
): StudentPrediction {
  const a = model.studentIndex.get(prediction.student) ?? -1;
  const records = (s: Signal) => {
    const d = model.signals[s];
    return a >= 0 ? d.rowPtr[a + 1] - d.rowPtr[a] : 0;
  };
  const one = (s: Signal, p: SignalPrediction): SignalPrediction => {
    const r =
      p.value === null
        ? null
        : likelyRange(
            tables?.[s],
            p.value,
            records(s),
            p.basis === 'neighbours' ? (p.strength ?? 0) : 0,
          );
    return {
      ...p,
      range: r ? { low: r.low, high: r.high } : null,
      confidence: r ? r.confidence : 'low',
    };
  };
  return {
    student: prediction.student,
    predictions: prediction.predictions.map((c) => {
      const grade = one('grade', c.grade);
      const satisfaction = one('satisfaction', c.satisfaction);
      const from =
        c.fitFrom === 'both'
          ? [grade, satisfaction]
          : c.fitFrom === 'grade'
            ? [grade]
            : c.fitFrom === 'satisfaction'
              ? [satisfaction]
              : [];
      const confidence = from.length
        ? from.reduce<Confidence>(
            (lo, x) => (LEVEL[x.confidence] < LEVEL[lo] ? x.confidence : lo),
            'high',
          )
        : 'low';
      return { ...c, grade, satisfaction, confidence };
    }),
  };
}
