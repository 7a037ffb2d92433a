/**
 * The demand outlook of department heads (`/api/forecasts`): expected enrolment per offered
 * elective with an 80 % interval against the seats, its backtest, and the cohort scoring runs
 * behind it (method.md, "Demand forecast for a term T").
 */

/**
 * over_subscribed: the interval's low end is above capacity; no_history: a new elective (never
 * "at risk" for that alone); at_risk: expected below the threshold.
 */
export const FORECAST_FLAGS = ['over_subscribed', 'at_risk', 'no_history', 'balanced'] as const;
export type ForecastFlag = (typeof FORECAST_FLAGS)[number];

export const FORECAST_FLAG_LABELS: Readonly<Record<ForecastFlag, string>> = Object.freeze({
  over_subscribed: 'Over-subscribed',
  at_risk: 'At risk',
  no_history: 'No history',
  balanced: 'Balanced',
});

/** The default at-risk threshold: an elective expected to draw fewer students than this. */
export const DEFAULT_AT_RISK_BELOW = 10;

/**
 * The class profile of an elective: who the expected students are, from the advising
 * estimates (null until computed).
 */
export interface ClassProfile {
  /** Mean predicted grade points of the expected students, weighted by their choice probability. */
  meanGrade: number | null;
  /** Expected share of them predicted below the threshold grade. */
  belowShare: number | null;
  /** The threshold letter (default C-). */
  threshold: string;
  /** Share of the expectation resting on kin rather than the baseline. */
  kinShare: number | null;
}

export interface CourseForecast {
  courseCode: string;
  title: string;
  department: string;
  capacity: number;
  sections: number | null;
  /** Expected enrolment E = sum over students of min(1, load × choice probability). */
  expected: number;
  /** 80 % interval E ± q sqrt(max(variance, 1)), q calibrated on past backtests; low floored at 0. */
  low: number;
  high: number;
  /** expected / capacity as a share (0.8 = 80 %); null when the offering has no seats. */
  utilisation: number | null;
  flag: ForecastFlag;
  /** The elective had no open pair in the history (new, or not offered lately). */
  noHistory: boolean;
  classProfile: ClassProfile | null;
}

export type OutlookRunStatus = 'queued' | 'computing' | 'done' | 'failed' | 'superseded';

export interface OutlookRunSummary {
  id: string;
  term: string;
  /** What asked for the run: start, import or manual. */
  reason: string;
  status: OutlookRunStatus;
  /** Terms computed so far (each backtest term, then the forecast) of stepsTotal. */
  stepsDone: number;
  stepsTotal: number;
  /** Share done, 0-1. */
  progress: number;
  /** Active students the forecast covers. */
  students: number | null;
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
}

/** What the outlook screen needs besides the rows. */
export interface ForecastAbout {
  term: string | null;
  /** Offered electives of the term imported so far (a head: their department's); 0 means none. */
  offerings: number;
  /** The run the numbers come from (null: none finished yet). */
  run: OutlookRunSummary | null;
  /** A newer run being computed, when there is one. */
  pending: OutlookRunSummary | null;
  /** One plain sentence on what drives demand. */
  drivers: string | null;
  defaultAtRiskBelow: number;
}

/** One backtest term: WAPE of the model and of the three simple forecasts, and coverage. */
export interface BacktestTerm {
  term: string;
  modelWape: number | null;
  /** Each course's enrolment the last time it ran. */
  naiveWape: number | null;
  /** Each course's enrolment in the same term a year before. */
  sameTermWape: number | null;
  /** Take-up rate × the students open to the course. */
  takeUpWape: number | null;
  /** Share of electives whose enrolment fell inside the 80 % interval. */
  coverage: number | null;
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
  sameTerm: number;
  takeUp: number;
  noHistory: boolean;
  /** |forecast - actual| / actual; null when nobody enrolled. */
  modelError: number | null;
  naiveError: number | null;
  /** The actual enrolment lies inside [low, high]. */
  inside: boolean;
}

export interface BacktestResponse {
  /** The last three completed terms, oldest first (over the whole institution). */
  terms: BacktestTerm[];
  /** The chosen term and its figures over the courses shown. */
  term: string | null;
  modelWape: number | null;
  naiveWape: number | null;
  sameTermWape: number | null;
  takeUpWape: number | null;
  coverage: number | null;
  /** One sentence when the model does not beat the best simple forecast over the terms; else null. */
  verdict: string | null;
  courses: BacktestCourse[];
}
