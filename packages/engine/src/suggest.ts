import { resolveSettings } from './api';
import { evaluate, SignalEvaluation } from './evaluate';
import { buildTable, RecordTable } from './model';
import { BuildOptions, RecordsInput, Settings, SettingsInput, SIGNALS } from './types';

/** One grid point's settings changes. */
export type SettingsChange = SettingsInput;

/**
 * The small grid "Suggest settings" tries (method.md): similarity source per signal, IUF,
 * centring, student damping, shrinkage and k, one or two at a time around the defaults.
 */
export const SUGGESTION_GRID: readonly SettingsChange[] = [
  {},
  { satisfactionSimilarity: 'satisfaction' },
  { satisfactionSimilarity: 'enrolment' },
  { gradeSimilarity: 'both' },
  { iuf: false },
  { centring: 'studentMean' },
  { damping: { grade: { student: 5, course: 5 }, satisfaction: { student: 5, course: 5 } } },
  { shrinkage: 10 },
  { shrinkage: 50 },
  { k: 20 },
  { k: 50 },
];

export interface Suggestion {
  /** The term the grid was judged on (the one before the holdout). */
  tuningTerm: string;
  holdoutTerm: string;
  /** Every grid point with its mean MAE over the signals on the tuning term. */
  tried: { settings: Settings; score: number }[];
  best: Settings;
  /** Mean MAE over the signals on the holdout: the best grid point and the settings in force. */
  holdout: { best: number; current: number; gain: number };
}

function score(signals: Partial<Record<string, SignalEvaluation>>, i: number): number {
  let sum = 0;
  let n = 0;
  for (const s of SIGNALS) {
    const mae = signals[s]?.configurations[i]?.mae;
    if (mae !== null && mae !== undefined) {
      sum += mae;
      n++;
    }
  }
  return n ? sum / n : Infinity;
}

/**
 * Judge the grid on the term before the holdout (trained on the terms before that), then
 * report the best point and the settings in force on the holdout itself, so the gain shown
 * is measured on data the choice did not see. Each grid point changes `base` (default: the
 * method's defaults).
 */
export function suggestSettings(
  input: RecordsInput | RecordTable,
  holdoutTerm: string,
  current: SettingsInput,
  options: BuildOptions & { grid?: readonly SettingsChange[]; base?: SettingsInput } = {},
): Suggestion {
  const table = 'studentKeys' in input ? input : buildTable(input, options);
  const T = table.termKeys.indexOf(holdoutTerm);
  if (T < 2) throw new Error(`holdout term ${holdoutTerm} needs two earlier terms to tune on`);
  const tuningTerm = table.termKeys[T - 1];
  const base = resolveSettings(options.base ?? {});
  const grid = (options.grid ?? SUGGESTION_GRID).map((change) =>
    resolveSettings({ ...base, ...change, damping: change.damping ?? base.damping }),
  );
  const tune = evaluate(table, { holdoutTerm: tuningTerm }, grid, { bootstrap: 0 });
  const tried = grid.map((settings, i) => ({ settings, score: score(tune.signals, i) }));
  let best = 0;
  for (let i = 1; i < tried.length; i++) if (tried[i].score < tried[best].score) best = i;
  const check = evaluate(table, { holdoutTerm }, [tried[best].settings, resolveSettings(current)], {
    bootstrap: 0,
  });
  const b = score(check.signals, 0);
  const c = score(check.signals, 1);
  return {
    tuningTerm,
    holdoutTerm,
    tried,
    best: tried[best].settings,
    holdout: { best: b, current: c, gain: c - b },
  };
}
