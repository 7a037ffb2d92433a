/**
 * The model settings registrar staff keep (`GET/PUT /api/model/settings`), as
 * method.md names them. Every change is a new numbered version.
 */
export const SIMILARITY_MEASURES = ['cosine', 'pearson'] as const;
export type SimilarityMeasure = (typeof SIMILARITY_MEASURES)[number];

export interface ModelSettings {
  /** Cosine similarity (default) or Pearson correlation. */
  similarity: SimilarityMeasure;
  /** Inverse user frequency: courses nearly everyone took count for less. */
  iuf: boolean;
  /** Compare each student's results relative to their own average. */
  center: boolean;
  /** At most this many kin per course. */
  k: number;
  /** Fewer contributing kin than this and the baseline serves instead. */
  minNeighbours: number;
  /** Only students more similar than this count as kin (-1 to 1). */
  minSimilarity: number;
  /** Significance weighting: similarities from fewer shared courses than this are scaled down; 0 is off. */
  significance: number;
  /** Weight of the predicted grade in the fit score; satisfaction gets the rest. */
  alpha: number;
}

/** Version 1 of every installation: the defaults of method.md. */
export const DEFAULT_MODEL_SETTINGS: Readonly<ModelSettings> = Object.freeze({
  similarity: 'cosine',
  iuf: true,
  center: true,
  k: 30,
  minNeighbours: 5,
  minSimilarity: 0,
  significance: 0,
  alpha: 0.5,
});

/** The accepted ranges, shared by the settings form and the server's validation. */
export const MODEL_SETTINGS_LIMITS = {
  k: { min: 1, max: 500 },
  minNeighbours: { min: 1 },
  minSimilarity: { min: -1, max: 1 },
  significance: { min: 0, max: 1000 },
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
