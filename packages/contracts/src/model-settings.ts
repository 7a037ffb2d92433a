/**
 * The model settings registrar staff keep (`GET/PUT /api/model/settings`), as
 * method.md names them. Every change is a new numbered version.
 */
export const SIMILARITY_MEASURES = ['cosine', 'pearson'] as const;
export type SimilarityMeasure = (typeof SIMILARITY_MEASURES)[number];

/** Where the likeness behind one estimate comes from (method.md, "Similarity source"). */
export const SIMILARITY_SOURCES = [
  'grade',
  'satisfaction',
  'both',
  'enrolment',
  'satisfaction+enrolment',
] as const;
export type SimilaritySourceName = (typeof SIMILARITY_SOURCES)[number];

/** What each result is compared with: the baseline, the student's own average, or nothing. */
export const CENTRINGS = ['baseline', 'studentMean', 'none'] as const;
export type CentringName = (typeof CENTRINGS)[number];

export interface ModelSettings {
  /** Cosine similarity (default) or Pearson correlation. */
  similarity: SimilarityMeasure;
  /** Inverse user frequency: courses nearly everyone took count for less. */
  iuf: boolean;
  /** Residuals the similarity and the estimate use; Pearson needs studentMean. */
  centring: CentringName;
  /** Similarity source for the grade estimate. */
  gradeSimilarity: SimilaritySourceName;
  /** Similarity source for the satisfaction estimate. */
  satisfactionSimilarity: SimilaritySourceName;
  /** Baseline damping (lambda_u, lambda_j) per signal. */
  gradeDampingStudent: number;
  gradeDampingCourse: number;
  satisfactionDampingStudent: number;
  satisfactionDampingCourse: number;
  /** At most this many kin per course. */
  k: number;
  /** Fewer contributing kin than this and the baseline serves instead. */
  minNeighbours: number;
  /** Only students more similar than this count as kin (-1 to 1). */
  minSimilarity: number;
  /** Significance weighting: similarities from fewer shared courses than this are scaled down; 0 is off. */
  significance: number;
  /** Significance shrinkage beta: w * n / (n + beta) with n shared courses; 0 is off. */
  shrinkage: number;
  /** Significant digits of similarity for ranking kin (ties to the smaller key); 0 ranks as computed. */
  tieDigits: number;
  /** Weight of the predicted grade in the fit score; satisfaction gets the rest. */
  alpha: number;
}

/** The defaults of method.md: the baseline-centred estimator. */
export const DEFAULT_MODEL_SETTINGS: Readonly<ModelSettings> = Object.freeze({
  similarity: 'cosine',
  iuf: true,
  centring: 'baseline',
  gradeSimilarity: 'grade',
  satisfactionSimilarity: 'satisfaction+enrolment',
  gradeDampingStudent: 1,
  gradeDampingCourse: 5,
  satisfactionDampingStudent: 5,
  satisfactionDampingCourse: 5,
  k: 30,
  minNeighbours: 5,
  minSimilarity: 0,
  significance: 0,
  shrinkage: 25,
  tieDigits: 12,
  alpha: 0.5,
});

/**
 * The original method's values of the estimator settings (mean-centred cosine of grades for
 * both estimates): what a stored version written before these settings existed meant.
 */
export const MEAN_CENTRED_MODEL_SETTINGS: Readonly<ModelSettings> = Object.freeze({
  ...DEFAULT_MODEL_SETTINGS,
  centring: 'studentMean',
  gradeSimilarity: 'grade',
  satisfactionSimilarity: 'grade',
  gradeDampingStudent: 5,
  gradeDampingCourse: 5,
  satisfactionDampingStudent: 5,
  satisfactionDampingCourse: 5,
  shrinkage: 0,
  tieDigits: 0,
});

/** The accepted ranges, shared by the settings form and the server's validation. */
export const MODEL_SETTINGS_LIMITS = {
  k: { min: 1, max: 500 },
  minNeighbours: { min: 1 },
  minSimilarity: { min: -1, max: 1 },
  significance: { min: 0, max: 1000 },
  damping: { min: 0, max: 1000 },
  shrinkage: { min: 0, max: 1000 },
  tieDigits: { min: 0, max: 15 },
  alpha: { min: 0, max: 1 },
  noteMaxLength: 500,
} as const;

/** One stored version of the settings. */
export interface ModelSettingsVersion {
  version: number;
  settings: ModelSettings;
  createdAt: string;
  /** E-mail of the registrar who saved it; null for the installation's defaults. */
  createdBy: string | null;
  note: string | null;
  /** Set when this version restored an earlier one. */
  restoredFrom: number | null;
}

/** `GET /api/model/settings`: the version in force. */
export type ModelSettingsResponse = ModelSettingsVersion;

/** `PUT /api/model/settings`: every setting, and an optional note on why. */
export interface UpdateModelSettingsRequest extends ModelSettings {
  note?: string;
}
