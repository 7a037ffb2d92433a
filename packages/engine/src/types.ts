/** The two outcomes Kinpath predicts for a student and a course. */
export type Signal = 'grade' | 'satisfaction';
export const SIGNALS: readonly Signal[] = ['grade', 'satisfaction'];

/** Where an estimate comes from: similar past students, the damped baseline, or nothing. */
export type Basis = 'neighbours' | 'baseline' | 'none';
export type Confidence = 'low' | 'medium' | 'high';

/** A closed range of values, e.g. grade points 0-4 or satisfaction 1-5. */
export interface Scale {
  min: number;
  max: number;
}

/**
 * Where the similarity that serves one predicted signal comes from: one signal's residuals,
 * the mean of both signals' cosines, enrolment (every course with any record, W included), or
 * the mean of the satisfaction and enrolment cosines.
 */
export type SimilaritySource =
  'grade' | 'satisfaction' | 'both' | 'enrolment' | 'satisfaction+enrolment';
export const SIMILARITY_SOURCES: readonly SimilaritySource[] = [
  'grade',
  'satisfaction',
  'both',
  'enrolment',
  'satisfaction+enrolment',
];

/**
 * What is subtracted from a value before similarities and predictions: the damped baseline
 * b_uj, the student's own mean m_u, or nothing (similarity on raw values; predictions then
 * centre on m_u as the original method did).
 */
export type Centring = 'baseline' | 'studentMean' | 'none';
export const CENTRINGS: readonly Centring[] = ['baseline', 'studentMean', 'none'];

/** Damping of the baseline means: student (lambda_u) and course (lambda_j). */
export interface Damping {
  student: number;
  course: number;
}

/** Model settings (method.md). Every field has a default in DEFAULT_SETTINGS. */
export interface Settings {
  /** Similarity source for predicting grades. */
  gradeSimilarity: SimilaritySource;
  /** Similarity source for predicting satisfaction. */
  satisfactionSimilarity: SimilaritySource;
  similarity: 'cosine' | 'pearson';
  /** Inverse user frequency, f_j = ln(N / n_j). */
  iuf: boolean;
  /** Residuals the similarity and the prediction use. Pearson needs 'studentMean'. */
  centring: Centring;
  /** Baseline damping per signal. */
  damping: Record<Signal, Damping>;
  /** Neighbourhood size per course. */
  k: number;
  /** Fewer contributing kin than this and the baseline serves. */
  minNeighbours: number;
  /** Candidates need a similarity strictly above this. */
  minSimilarity: number;
  /** Significance weighting threshold g (w * min(n, g) / g); 0 turns it off. */
  significance: number;
  /** Significance shrinkage beta (w * n / (n + beta)); 0 turns it off. */
  shrinkage: number;
  /**
   * Significant digits of w for ranking kin, so that similarities equal in exact arithmetic
   * tie and go to the smaller key; 0 ranks on w as computed.
   */
  tieDigits: number;
  /** Weight of the grade in the fit score; satisfaction gets 1 - alpha. */
  alpha: number;
}

function dampings(gs: number, gc: number, ss: number, sc: number): Record<Signal, Damping> {
  return Object.freeze({
    grade: Object.freeze({ student: gs, course: gc }),
    satisfaction: Object.freeze({ student: ss, course: sc }),
  });
}

/** The estimator of method.md: baseline-centred residual cosine, satisfaction helped by enrolment. */
export const DEFAULT_SETTINGS: Readonly<Settings> = Object.freeze({
  gradeSimilarity: 'grade',
  satisfactionSimilarity: 'satisfaction+enrolment',
  similarity: 'cosine',
  iuf: true,
  centring: 'baseline',
  damping: dampings(1, 5, 5, 5),
  k: 30,
  minNeighbours: 5,
  minSimilarity: 0,
  significance: 0,
  shrinkage: 25,
  tieDigits: 12,
  alpha: 0.5,
}) as Readonly<Settings>;

/**
 * The original method (mean-centred cosine of grades for both signals, no shrinkage), kept
 * selectable; it reproduces that method's results bit for bit.
 */
export const MEAN_CENTRED_SETTINGS: Readonly<Settings> = Object.freeze({
  ...DEFAULT_SETTINGS,
  gradeSimilarity: 'grade',
  satisfactionSimilarity: 'grade',
  centring: 'studentMean',
  damping: dampings(5, 5, 5, 5),
  shrinkage: 0,
  tieDigits: 0,
}) as Readonly<Settings>;

/**
 * Settings as callers may give them: every field optional, and the original method's
 * `similaritySignal` (one signal's similarity serves both) and `center` still understood.
 */
export type SettingsInput = Partial<Settings> & {
  similaritySignal?: Signal;
  center?: boolean;
};

/** A value column: null, undefined or NaN mark a record with no value in that signal (a W mark, an empty survey cell). */
export type ValueColumn = ArrayLike<number | null | undefined>;

/**
 * Records as parallel arrays, one entry per attempt. Keys are any non-empty strings.
 * Terms compare with `BuildOptions.compareTerms` (string order by default).
 */
export interface RecordsInput {
  students: ArrayLike<string>;
  courses: ArrayLike<string>;
  terms: ArrayLike<string>;
  grades: ValueColumn;
  satisfaction?: ValueColumn;
}

export interface BuildOptions {
  /**
   * Scales per signal. When given, a value outside the scale is refused at build time and
   * predictions are clamped to it. Without a scale nothing is clamped.
   */
  scales?: Partial<Record<Signal, Scale>>;
  /** Term order; string order when absent. Return < 0 when a is earlier than b. */
  compareTerms?: (a: string, b: string) => number;
}

/** One signal's estimate for one student and course. `value` is null only when basis is 'none'. */
export interface SignalPrediction {
  value: number | null;
  /** Contributing kin (neighbours) count. */
  neighbours: number;
  basis: Basis;
  /** |w|-weighted standard deviation of the kin's deviations r_ij - m_i; null unless basis is 'neighbours'. */
  spread: number | null;
  confidence: Confidence;
  /** Kin strength: the kin's summed |w| (0 unless basis is 'neighbours'). */
  strength?: number;
  /** The likely range (80 %), when ranges were applied (applyRanges); null without one. */
  range?: { low: number; high: number } | null;
}

export interface CoursePrediction {
  course: string;
  grade: SignalPrediction;
  satisfaction: SignalPrediction;
  /** 0-100, null when neither signal has a value. */
  fit: number | null;
  /** Which signals the fit rests on. */
  fitFrom: 'both' | Signal | null;
  /** The lower confidence of the signals the fit rests on. */
  confidence: Confidence;
}

export interface StudentPrediction {
  student: string;
  predictions: CoursePrediction[];
}

export interface Kin {
  student: string;
  similarity: number;
  /** Courses both students have a value for in the similarity signal. */
  overlap: number;
}
