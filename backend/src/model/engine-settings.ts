import type { ModelSettings } from '@kinpath/contracts';
import type { Settings } from '@kinpath/engine';

/** The engine's settings for stored ones: similarities always come from grades (method.md). */
export function engineSettings(settings: ModelSettings): Settings {
  return {
    similaritySignal: 'grade',
    similarity: settings.similarity,
    iuf: settings.iuf,
    center: settings.center,
    k: settings.k,
    minNeighbours: settings.minNeighbours,
    minSimilarity: settings.minSimilarity,
    significance: settings.significance,
    alpha: settings.alpha,
  };
}
