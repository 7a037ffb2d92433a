/** The outlook's accuracy figures (method.md, "Interval" and "Backtests"). */

/** The two-sided 80 % standard normal quantile (standard normal table): q before any backtest. */
export const Z80 = 1.2816;

/** WAPE = sum |E_c − A_c| / sum A_c; null when nothing was enrolled. */
export function wape(forecast: ArrayLike<number>, actual: ArrayLike<number>): number | null {
  if (forecast.length !== actual.length) {
    throw new Error('wape: forecast and actual differ in length');
  }
  let num = 0;
  let den = 0;
  for (let c = 0; c < actual.length; c++) {
    num += Math.abs(forecast[c] - actual[c]);
    den += actual[c];
  }
  return den > 0 ? num / den : null;
}

/** The interval's scale: sqrt(max(V, 1)). */
export function spread(variance: number): number {
  return Math.sqrt(Math.max(variance, 1));
}

/** [max(0, E − q·sqrt(max(V,1))), E + q·sqrt(max(V,1))]. */
export function interval(expected: number, variance: number, q: number): [number, number] {
  const h = q * spread(variance);
  return [Math.max(0, expected - h), expected + h];
}

/** Share of courses whose actual enrolment lies inside [low, high]; null for none. */
export function coverage(
  low: ArrayLike<number>,
  high: ArrayLike<number>,
  actual: ArrayLike<number>,
): number | null {
  if (actual.length === 0) return null;
  let inside = 0;
  for (let c = 0; c < actual.length; c++) {
    if (actual[c] >= low[c] && actual[c] <= high[c]) inside++;
  }
  return inside / actual.length;
}

/**
 * The p-quantile by linear interpolation between order statistics (Hyndman & Fan 1996,
 * definition 7, the default of R and NumPy).
 */
export function quantile(values: ArrayLike<number>, p: number): number {
  const sorted = Float64Array.from(values).sort();
  if (sorted.length === 0) return NaN;
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * The calibrated q: the 80th percentile of |A − E| / sqrt(max(V, 1)) over every elective of
 * the backtests given; Z80 when there are none.
 */
export function calibratedQ(
  backtests: readonly {
    expected: ArrayLike<number>;
    variance: ArrayLike<number>;
    actual: ArrayLike<number>;
  }[],
): number {
  const scores: number[] = [];
  for (const b of backtests) {
    for (let c = 0; c < b.actual.length; c++) {
      scores.push(Math.abs(b.actual[c] - b.expected[c]) / spread(b.variance[c]));
    }
  }
  return scores.length ? quantile(scores, 0.8) : Z80;
}
