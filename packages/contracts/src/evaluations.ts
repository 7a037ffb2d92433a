import type { ModelSettings } from './model-settings';

/**
 * Backtests of model configurations (`/api/model/evaluations`): the engine's
 * time-holdout evaluation of method.md, per configuration and per baseline.
 */

/** At most this many configurations in one backtest. */
export const MAX_EVALUATION_CONFIGURATIONS = 8;
/** A configuration's optional name, shown in the results. */
export const EVALUATION_NAME_MAX_LENGTH = 60;

export const EVALUATION_STATUSES = ['queued', 'running', 'finished', 'failed'] as const;
export type EvaluationStatus = (typeof EVALUATION_STATUSES)[number];

export const EVALUATION_SIGNALS = ['grade', 'satisfaction'] as const;
export type EvaluationSignal = (typeof EVALUATION_SIGNALS)[number];

/** The four baselines of method.md, with the names the results carry. */
export const EVALUATION_BASELINES = [
  { key: 'globalMean', name: 'Global mean' },
  { key: 'courseMean', name: 'Course mean' },
  { key: 'studentMean', name: 'Student mean' },
  { key: 'dampedBias', name: 'Damped bias' },
] as const;
export type EvaluationBaselineKey = (typeof EVALUATION_BASELINES)[number]['key'];

/** One configuration to test: every setting, and an optional name. */
export interface EvaluationConfiguration extends ModelSettings {
  name?: string;
}

/** `POST /api/model/evaluations`. */
export interface CreateEvaluationRequest {
  /** Default: the last completed term (the latest term with records). */
  holdoutTerm?: string;
  configurations: EvaluationConfiguration[];
}

export interface EvaluationAccepted {
  id: string;
}

/** Accuracy of one configuration or baseline in one signal, over `n` held-out outcomes. */
export interface EvaluationResult {
  name: string;
  signal: EvaluationSignal;
  /** null when there was nothing to test (n = 0). */
  mae: number | null;
  rmse: number | null;
  /** Share of the held-out outcomes predicted from kin (baselines: from their own data). */
  coverage: number | null;
  n: number;
  kind: 'configuration' | 'baseline';
  /** Index into `configurations` (configurations only). */
  configuration: number | null;
  /** The baseline's key (baselines only). */
  baseline: EvaluationBaselineKey | null;
  /**
   * Configurations, overall: the MAE margin over the best baseline (positive: better) with
   * a 95 % interval from resampling students; null for baselines and per department.
   */
  margin: EvaluationMargin | null;
  /** Configurations, overall: how the 80 % likely ranges did; null otherwise. */
  ranges: EvaluationRanges | null;
}

export interface EvaluationMargin {
  baseline: EvaluationBaselineKey;
  mae: number;
  low: number;
  high: number;
}

export interface EvaluationRanges {
  /** The term before the holdout, whose residuals made the ranges. */
  calibrationTerm: string;
  /** Share of held-out outcomes inside their likely range. */
  coverage: number | null;
  meanWidth: number | null;
  byConfidence: Record<'low' | 'medium' | 'high', { n: number; coverage: number | null }>;
}

export interface EvaluationDepartmentResult extends EvaluationResult {
  department: string;
}

/** The term data a backtest ran on: the latest committed or rolled-back import. */
export interface EvaluationDataState {
  latestImportId: string | null;
  latestImportAt: string | null;
  records: number | null;
  students: number | null;
}

export interface EvaluationSummary {
  id: string;
  status: EvaluationStatus;
  /** 0 to 1. */
  progress: number;
  holdoutTerm: string;
  /** The configurations tested, each with its name filled in. */
  configurations: (ModelSettings & { name: string })[];
  /** The settings version in force when the backtest was asked for. */
  settingsVersion: number | null;
  dataState: EvaluationDataState;
  createdAt: string;
  createdBy: string | null;
  startedAt: string | null;
  finishedAt: string | null;
  /** Why a backtest failed. */
  message: string | null;
}

/** `GET /api/model/evaluations/:id`. */
export interface EvaluationDetail extends EvaluationSummary {
  results: EvaluationResult[];
  byDepartment: EvaluationDepartmentResult[];
}

/** The name a configuration gets when none is given. */
export function configurationName(index: number, name?: string | null): string {
  const given = name?.trim();
  return given ? given : `Configuration ${index + 1}`;
}
