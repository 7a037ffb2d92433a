import type { ModelSettings } from '@kinpath/contracts';
import type { Settings } from '@kinpath/engine';

/** The engine's settings for stored ones (method.md). */
export function engineSettings(settings: ModelSettings): Settings {
  return {
    gradeSimilarity: settings.gradeSimilarity,
    satisfactionSimilarity: settings.satisfactionSimilarity,
    similarity: settings.similarity,
    iuf: settings.iuf,
    centring: settings.centring,
    damping: {
      grade: { student: settings.gradeDampingStudent, course: settings.gradeDampingCourse },
      satisfaction: {
        student: settings.satisfactionDampingStudent,
        course: settings.satisfactionDampingCourse,
      },
    },
    k: settings.k,
    minNeighbours: settings.minNeighbours,
    minSimilarity: settings.minSimilarity,
    significance: settings.significance,
    shrinkage: settings.shrinkage,
    tieDigits: settings.tieDigits,
    alpha: settings.alpha,
  };
}
