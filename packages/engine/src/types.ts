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

/** Model settings (method.md). Every field has a default in DEFAULT_SETTINGS. */
export interface Settings {
  /** The signal whose values decide who is alike; the same similarities serve every signal. */
  similaritySignal: Signal;
  similarity: 'cosine' | 'pearson';
  /** Inverse user frequency, f_j = ln(N / n_j). */
  iuf: boolean;
  /** Cosine over r - m_u (on) or over r (off). Pearson always centres. */
  center: boolean;
  /** Neighbourhood size per course. */
  k: number;
  /** Fewer contributing kin than this and the baseline serves. */
  minNeighbours: number;
  /** Candidates need a similarity strictly above this. */
  minSimilarity: number;
  /** Significance weighting threshold g; 0 turns it off. */
  significance: number;
  /** Weight of the grade in the fit score; satisfaction gets 1 - alpha. */
  alpha: number;
}

export const DEFAULT_SETTINGS: Readonly<Settings> = Object.freeze({
  similaritySignal: 'grade',
  similarity: 'cosine',
  iuf: true,
  center: true,
  k: 30,
  minNeighbours: 5,
  minSimilarity: 0,
  significance: 0,
  alpha: 0.5,
});

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
