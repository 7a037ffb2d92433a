/**
 * Kinpath engine: user-based memory collaborative filtering over course records.
 * See README.md for the public surface and ../../docs or the design notes for the method.
 */
export * from './types';
export { buildModel, buildTable, modelFromTable, RecordError } from './model';
export type { Model, RecordTable } from './model';
export {
  resolveSettings,
  similarities,
  predictStudent,
  predictSignal,
  explain,
  OUTCOME_DISCLOSURE_MIN,
} from './api';
export type { Explanation } from './api';
export { CONFIDENCE_DESCRIPTION, CONFIDENCE_RULE, DEFAULT_SCALES } from './score';
export { scoreBatch, toStudentPrediction, defaultWorkerPath } from './batch';
export type { BatchRequest, BatchOptions, StudentScores, CompactSignal } from './batch';
export { BASIS_NAMES, CONFIDENCE_NAMES } from './score';
export { evaluate, calibrateRanges, HOLDOUT_MIN_EARLIER_RECORDS } from './evaluate';
export type {
  EvaluationPlan,
  EvaluationReport,
  Margin,
  Metrics,
  RangeMetrics,
  SignalEvaluation,
} from './evaluate';
export {
  applyRanges,
  likelyRange,
  rangeTable,
  confidenceOfWidth,
  RANGE_CONFIDENCE_DESCRIPTION,
  RANGE_CONFIDENCE_RULE,
  RANGE_LEVEL,
  RANGE_MIN_CELLS,
} from './ranges';
export type { LikelyRange, RangeBin, RangeTable } from './ranges';
export * as outlook from './outlook';
export { generateUniversity, registrarTermOrder } from './generator';
export type { University, UniversityOptions } from './generator';
export { suggestSettings, SUGGESTION_GRID } from './suggest';
export type { Suggestion, SettingsChange } from './suggest';
