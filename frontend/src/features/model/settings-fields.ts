import type {
  CentringName,
  ModelSettings,
  SimilarityMeasure,
  SimilaritySourceName,
} from '@kinpath/contracts';
import { MODEL_SETTINGS_LIMITS as LIMITS } from '@kinpath/contracts';

/** Numbers stay text while edited, so a half-typed "0." or "-" is not turned into a number too early. */
export interface SettingsFieldValues {
  similarity: SimilarityMeasure;
  iuf: boolean;
  centring: CentringName;
  gradeSimilarity: SimilaritySourceName;
  satisfactionSimilarity: SimilaritySourceName;
  gradeDampingStudent: string;
  gradeDampingCourse: string;
  satisfactionDampingStudent: string;
  satisfactionDampingCourse: string;
  k: string;
  minNeighbours: string;
  minSimilarity: string;
  significance: string;
  shrinkage: string;
  tieDigits: string;
  alpha: string;
}

export type NumberField =
  | 'gradeDampingStudent'
  | 'gradeDampingCourse'
  | 'satisfactionDampingStudent'
  | 'satisfactionDampingCourse'
  | 'k'
  | 'minNeighbours'
  | 'minSimilarity'
  | 'significance'
  | 'shrinkage'
  | 'tieDigits'
  | 'alpha';

export function toFieldValues(s: ModelSettings): SettingsFieldValues {
  return {
    similarity: s.similarity,
    iuf: s.iuf,
    centring: s.centring,
    gradeSimilarity: s.gradeSimilarity,
    satisfactionSimilarity: s.satisfactionSimilarity,
    gradeDampingStudent: String(s.gradeDampingStudent),
    gradeDampingCourse: String(s.gradeDampingCourse),
    satisfactionDampingStudent: String(s.satisfactionDampingStudent),
    satisfactionDampingCourse: String(s.satisfactionDampingCourse),
    k: String(s.k),
    minNeighbours: String(s.minNeighbours),
    minSimilarity: String(s.minSimilarity),
    significance: String(s.significance),
    shrinkage: String(s.shrinkage),
    tieDigits: String(s.tieDigits),
    alpha: String(s.alpha),
  };
}

export function toSettings(v: SettingsFieldValues): ModelSettings {
  return {
    similarity: v.similarity,
    iuf: v.iuf,
    centring: v.centring,
    gradeSimilarity: v.gradeSimilarity,
    satisfactionSimilarity: v.satisfactionSimilarity,
    gradeDampingStudent: Number(v.gradeDampingStudent),
    gradeDampingCourse: Number(v.gradeDampingCourse),
    satisfactionDampingStudent: Number(v.satisfactionDampingStudent),
    satisfactionDampingCourse: Number(v.satisfactionDampingCourse),
    k: Number(v.k),
    minNeighbours: Number(v.minNeighbours),
    minSimilarity: Number(v.minSimilarity),
    significance: Number(v.significance),
    shrinkage: Number(v.shrinkage),
    tieDigits: Number(v.tieDigits),
    alpha: Number(v.alpha),
  };
}

const WHOLE = /^\d+$/;
const DECIMAL = /^-?\d+(\.\d+)?$/;

/** The server's ranges (MODEL_SETTINGS_LIMITS), checked before sending; messages say what to enter. */
export function checkNumber(
  field: NumberField,
  text: string,
  all: SettingsFieldValues,
): true | string {
  const value = text.trim();
  if (value === '') return 'Enter a value.';
  switch (field) {
    case 'gradeDampingStudent':
    case 'gradeDampingCourse':
    case 'satisfactionDampingStudent':
    case 'satisfactionDampingCourse':
      if (!DECIMAL.test(value) || Number(value) < 0 || Number(value) > LIMITS.damping.max)
        return `Enter a number from 0 to ${LIMITS.damping.max}.`;
      return true;
    case 'shrinkage':
      if (!DECIMAL.test(value) || Number(value) < 0 || Number(value) > LIMITS.shrinkage.max)
        return `Enter a number from 0 (off) to ${LIMITS.shrinkage.max}.`;
      return true;
    case 'tieDigits':
      if (!WHOLE.test(value) || Number(value) > LIMITS.tieDigits.max)
        return `Enter a whole number from 0 (off) to ${LIMITS.tieDigits.max}.`;
      return true;
    case 'k':
      if (!WHOLE.test(value) || Number(value) < LIMITS.k.min || Number(value) > LIMITS.k.max)
        return `Enter a whole number from ${LIMITS.k.min} to ${LIMITS.k.max}.`;
      return true;
    case 'minNeighbours':
      if (!WHOLE.test(value) || Number(value) < LIMITS.minNeighbours.min)
        return `Enter a whole number of at least ${LIMITS.minNeighbours.min}.`;
      if (WHOLE.test(all.k.trim()) && Number(value) > Number(all.k))
        return `Minimum kin cannot be larger than k (${all.k.trim()}).`;
      return true;
    case 'minSimilarity':
      if (
        !DECIMAL.test(value) ||
        Number(value) < LIMITS.minSimilarity.min ||
        Number(value) > LIMITS.minSimilarity.max
      )
        return 'Enter a number from -1 to 1.';
      return true;
    case 'significance':
      if (!WHOLE.test(value) || Number(value) > LIMITS.significance.max)
        return `Enter a whole number from 0 (off) to ${LIMITS.significance.max}.`;
      return true;
    case 'alpha':
      if (
        !DECIMAL.test(value) ||
        Number(value) < LIMITS.alpha.min ||
        Number(value) > LIMITS.alpha.max
      )
        return 'Enter a number from 0 to 1.';
      return true;
  }
}
