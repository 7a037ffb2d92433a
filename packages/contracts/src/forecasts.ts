/**
 * The demand outlook of department heads (`/api/forecasts`): expected enrolment per offered
 * elective with an 80 % interval against the seats, its backtest, and the cohort scoring runs
 * behind it (method.md, "Demand forecast for a term T").
 */

/** over_subscribed: the interval's low end is above capacity; at_risk: expected below the threshold. */
export const FORECAST_FLAGS = ['over_subscribed', 'at_risk', 'balanced'] as const;
export type ForecastFlag = (typeof FORECAST_FLAGS)[number];

export const FORECAST_FLAG_LABELS: Readonly<Record<ForecastFlag, string>> = Object.freeze({
  over_subscribed: 'Over-subscribed',
  at_risk: 'At risk',
  balanced: 'Balanced',
});

/** The default at-risk threshold: an elective expected to draw fewer students than this. */
export const DEFAULT_AT_RISK_BELOW = 10;

/** The two-sided 80 % standard normal quantile (standard normal table). */
export const FORECAST_Z80 = 1.2816;

export interface CourseForecast {
  courseCode: string;
  title: string;
  department: string;
  capacity: number;
  sections: number | null;
  /** Expected enrolment E = sum of the students' choice probabilities. */
  expected: number;
  /** 80 % interval E ± 1.2816 sqrt(variance), the low end floored at 0. */
  low: number;
  high: number;
  /** expected / capacity; null when the offering has no seats. */
  utilisation: number | null;
  flag: ForecastFlag;
}

export type ScoringRunStatus =
  'queued' | 'scoring' | 'finalising' | 'done' | 'failed' | 'superseded';

export interface ScoringRunSummary {
  id: string;
  term: string;
  settingsVersion: number;
  /** What asked for the run: start, import, settings or manual. */
  reason: string;
  status: ScoringRunStatus;
  chunksDone: number;
  chunksTotal: number;
  /** Share of chunks done, 0-1. */
  progress: number;
  students: number | null;
  rows: number | null;
  beta: number | null;
  backtestTerm: string | null;
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
}

/** What the outlook screen needs besides the rows: the term, its offerings and how beta was set. */
export interface ForecastAbout {
  term: string | null;
  /** Offerings of the term's electives imported so far; 0 means the registrar must import them. */
  offerings: number;
  /** The run the numbers come from (null: none finished yet). */
  run: ScoringRunSummary | null;
  /** A newer run being computed, when there is one. */
  pending: ScoringRunSummary | null;
  /** One plain sentence on how beta was calibrated. */
  betaMethod: string | null;
  defaultAtRiskBelow: number;
}

export interface BacktestCourse {
  courseCode: string;
  title: string;
  department: string;
  /** The model's expected enrolment, made from data before the term. */
  forecast: number;
  low: number;
  high: number;
  /** Students who really enrolled (records in the term). */
  actual: number;
  /** Enrolment the last time the course ran before the term (0 when it never ran). */
  naive: number;
  /** The term the naive figure comes from. */
  naiveTerm: string | null;
  /** |forecast - actual| / actual; null when nobody enrolled. */
  modelError: number | null;
  naiveError: number | null;
}

export interface BacktestResponse {
  term: string | null;
  /** sum |E - A| / sum A over the courses shown; null when nothing was enrolled. */
  modelWape: number | null;
  naiveWape: number | null;
  /** The beta used for this backtest and where it was calibrated. */
  beta: number | null;
  betaMethod: string | null;
  courses: BacktestCourse[];
}
