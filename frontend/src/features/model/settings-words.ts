import type { ModelSettings } from '@kinpath/contracts';
import { MODEL_SETTINGS_LIMITS as LIMITS } from '@kinpath/contracts';

/** Each setting's label and a plain sentence on what it does, shared by the settings and backtest pages. */
export const SETTING_TEXT: Record<keyof ModelSettings, { label: string; help: string }> = {
  similarity: {
    label: 'Similarity',
    help: 'How alike two students are. Cosine similarity compares their results over all their courses; Pearson correlation compares them only on the courses both took.',
  },
  iuf: {
    label: 'Inverse user frequency (IUF)',
    help: 'Courses nearly everyone took, such as core courses, count for less when finding kin: they say little about who is alike.',
  },
  center: {
    label: 'Centring',
    help: "Compares each result with the student's own average, so two strong students are not kin merely for both being strong. Pearson correlation always centres.",
  },
  k: {
    label: 'k (kin per course)',
    help: `At most this many of the most similar past students who took the course are used for its estimate. From ${LIMITS.k.min} to ${LIMITS.k.max}.`,
  },
  minNeighbours: {
    label: 'Minimum kin',
    help: 'With fewer contributing kin than this, the estimate comes from the baseline and says so. It also keeps an estimate from revealing a few students’ grades; 5 is a common choice. At least 1 and at most k.',
  },
  minSimilarity: {
    label: 'Minimum similarity',
    help: 'Only past students more similar than this count as kin. From -1 to 1; 0 keeps everyone with any likeness.',
  },
  significance: {
    label: 'Significance weighting',
    help: 'A similarity resting on fewer shared courses than this number is scaled down in proportion; 0 turns it off.',
  },
  alpha: {
    label: 'Fit weight alpha',
    help: 'How much the predicted grade counts in the fit score; satisfaction counts for the rest. From 0 to 1; 0.5 weighs them equally. It does not change the estimates themselves.',
  },
};

/** One line naming every setting, for confirmations and result tables. */
export function describeSettings(s: ModelSettings): string {
  return [
    s.similarity === 'cosine' ? 'cosine' : 'Pearson',
    `IUF ${s.iuf ? 'on' : 'off'}`,
    `centring ${s.center ? 'on' : 'off'}`,
    `k ${s.k}`,
    `minimum kin ${s.minNeighbours}`,
    `minimum similarity ${s.minSimilarity}`,
    `significance ${s.significance === 0 ? 'off' : s.significance}`,
    `alpha ${s.alpha}`,
  ].join(', ');
}
