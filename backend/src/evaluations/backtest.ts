import type {
  EvaluationBaselineKey,
  EvaluationDepartmentResult,
  EvaluationResult,
  EvaluationSignal,
  ModelSettings,
} from '@kinpath/contracts';
import { EVALUATION_BASELINES, EVALUATION_SIGNALS } from '@kinpath/contracts';
import { evaluate, type Metrics, type Scale, type SignalEvaluation } from '@kinpath/engine';
import { engineSettings } from '../model/engine-settings';
import { termOfSortKey } from '../model/term-keys';

/** Records as the model reads them: parallel arrays, terms already as the engine's keys. */
export interface BacktestRecords {
  students: string[];
  courses: string[];
  terms: string[];
  grades: number[];
  satisfaction: number[];
}

/** Everything one backtest needs; plain data, so it can cross to a worker thread. */
export interface BacktestInput {
  records: BacktestRecords;
  scales: { grade?: Scale; satisfaction?: Scale };
  /** The engine's key of the held-out term (see term-keys.ts). */
  holdoutKey: string;
  configurations: (ModelSettings & { name: string })[];
  /** Department of each course code; records of unknown courses count under 'unknown'. */
  departments: Record<string, string>;
}

export interface BacktestOutput {
  results: EvaluationResult[];
  byDepartment: EvaluationDepartmentResult[];
}

export type BacktestProgress = (done: number, total: number) => void;

const UNKNOWN_DEPARTMENT = 'unknown';
function row(
  metrics: Metrics & Partial<Pick<SignalEvaluation['configurations'][number], 'margin' | 'ranges'>>,
  signal: EvaluationSignal,
  name: string,
  configuration: number | null,
  baseline: EvaluationBaselineKey | null,
): EvaluationResult {
  return {
    name,
    signal,
    mae: metrics.mae,
    rmse: metrics.rmse,
    coverage: metrics.coverage,
    n: metrics.n,
    kind: configuration === null ? 'baseline' : 'configuration',
    configuration,
    baseline,
    margin: metrics.margin ?? null,
    ranges: metrics.ranges
      ? { ...metrics.ranges, calibrationTerm: termOfSortKey(metrics.ranges.calibrationTerm) }
      : null,
  };
}

function baselineRows(signal: EvaluationSignal, report: SignalEvaluation): EvaluationResult[] {
  return EVALUATION_BASELINES.map((b) => row(report.baselines[b.key], signal, b.name, null, b.key));
}

/**
 * The engine's time-holdout evaluation of every configuration, next to the four
 * baselines, overall and per department of the held-out course. One engine call
 * per configuration overall (so progress moves), then one per department.
 *
 * Per department, the held-out values of other departments' courses are blanked:
 * the training records, and so every similarity, stay as overall, and the test
 * cells are exactly the overall ones of that department.
 */
export function runBacktest(input: BacktestInput, onProgress?: BacktestProgress): BacktestOutput {
  const { records, holdoutKey, configurations, scales } = input;
  const plan = { holdoutTerm: holdoutKey };
  const settings = configurations.map((c) => engineSettings(c));
  const options = { scales, signals: EVALUATION_SIGNALS };

  const departmentOf = (course: string) => input.departments[course] ?? UNKNOWN_DEPARTMENT;
  const departments = new Set<string>();
  for (let r = 0; r < records.terms.length; r++) {
    if (records.terms[r] === holdoutKey) departments.add(departmentOf(records.courses[r]));
  }
  const departmentList = [...departments].sort();
  const total = settings.length + departmentList.length;
  let done = 0;
  const step = () => onProgress?.(++done, total);

  const configurationRows: EvaluationResult[][] = [];
  let baselines: EvaluationResult[] = [];
  settings.forEach((one, index) => {
    const report = evaluate(records, plan, [one], { ...options, ranges: true });
    const rows: EvaluationResult[] = [];
    for (const signal of EVALUATION_SIGNALS) {
      const signalReport = report.signals[signal];
      if (!signalReport) continue;
      rows.push(
        row(signalReport.configurations[0], signal, configurations[index].name, index, null),
      );
      // Baselines do not depend on the configuration: the first call's serve.
      if (index === 0) baselines = baselines.concat(baselineRows(signal, signalReport));
    }
    configurationRows.push(rows);
    step();
  });
  const results = EVALUATION_SIGNALS.flatMap((signal) => [
    ...configurationRows.flat().filter((r) => r.signal === signal),
    ...baselines.filter((r) => r.signal === signal),
  ]);

  const byDepartment: EvaluationDepartmentResult[] = [];
  for (const department of departmentList) {
    const subset = departmentRecords(
      records,
      holdoutKey,
      (course) => departmentOf(course) === department,
    );
    const report = evaluate(subset, plan, settings, { ...options, bootstrap: 0 });
    for (const signal of EVALUATION_SIGNALS) {
      const signalReport = report.signals[signal];
      if (!signalReport) continue;
      const rows = [
        ...signalReport.configurations.map((m, index) =>
          row(m, signal, configurations[index].name, index, null),
        ),
        ...baselineRows(signal, signalReport),
      ];
      for (const r of rows) if (r.n > 0) byDepartment.push({ department, ...r });
    }
    step();
  }
  return { results, byDepartment };
}

/**
 * The same records with the held-out values of other courses blanked. Records are
 * blanked rather than dropped so the engine sees the same keys in the same order:
 * its floating-point sums, and so ties between equally similar kin, come out the same.
 */
function departmentRecords(
  records: BacktestRecords,
  holdoutKey: string,
  chosen: (course: string) => boolean,
): BacktestRecords {
  const grades = records.grades.slice();
  const satisfaction = records.satisfaction.slice();
  for (let r = 0; r < records.terms.length; r++) {
    if (records.terms[r] === holdoutKey && !chosen(records.courses[r])) {
      grades[r] = NaN;
      satisfaction[r] = NaN;
    }
  }
  return { ...records, grades, satisfaction };
}
