import type { EvaluationResult, EvaluationSignal } from '@kinpath/contracts';

/** Two metrics this close are the same to the digits shown and beyond. */
const SAME = 1e-12;

export interface SignalSummary {
  rows: EvaluationResult[];
  /** The lowest MAE and RMSE over every row with something tested. */
  bestMae: number | null;
  bestRmse: number | null;
  bestConfiguration: EvaluationResult | null;
  bestBaseline: EvaluationResult | null;
  /** A baseline's MAE is lower than every configuration's. */
  baselineWins: boolean;
}

const lowest = (rows: EvaluationResult[], key: 'mae' | 'rmse') =>
  rows.reduce<EvaluationResult | null>((best, r) => {
    const value = r[key];
    if (value === null || r.n === 0) return best;
    return best === null || value < (best[key] as number) - SAME ? r : best;
  }, null);

export function summarise(results: EvaluationResult[], signal: EvaluationSignal): SignalSummary {
  const rows = results.filter((r) => r.signal === signal);
  const bestConfiguration = lowest(
    rows.filter((r) => r.kind === 'configuration'),
    'mae',
  );
  const bestBaseline = lowest(
    rows.filter((r) => r.kind === 'baseline'),
    'mae',
  );
  return {
    rows,
    bestMae: lowest(rows, 'mae')?.mae ?? null,
    bestRmse: lowest(rows, 'rmse')?.rmse ?? null,
    bestConfiguration,
    bestBaseline,
    baselineWins:
      bestConfiguration?.mae != null &&
      bestBaseline?.mae != null &&
      bestBaseline.mae < bestConfiguration.mae - SAME,
  };
}

export const isBest = (value: number | null, best: number | null) =>
  value !== null && best !== null && Math.abs(value - best) <= SAME;
