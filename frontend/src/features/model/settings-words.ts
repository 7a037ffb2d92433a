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
  centring: {
    label: 'Centring',
    help: "What each result is compared with before students are compared: the baseline (the overall average adjusted for the course and the student; the default), the student's own average, or nothing. Pearson correlation always uses the student's own average.",
  },
  gradeSimilarity: {
    label: 'Kin for the grade found by',
    help: 'Which results decide who is alike for the grade estimate: grades (the default), satisfaction answers, both, the courses taken (enrolment, withdrawals included), or satisfaction and enrolment together.',
  },
  satisfactionSimilarity: {
    label: 'Kin for satisfaction found by',
    help: 'Which results decide who is alike for the satisfaction estimate; the default, satisfaction and enrolment together, finds students who enjoyed and chose courses alike.',
  },
  gradeDampingStudent: {
    label: 'Grade baseline: student damping',
    help: "How many average results a student's own record is blended with before it moves the baseline; larger keeps short records nearer the average. Default 1.",
  },
  gradeDampingCourse: {
    label: 'Grade baseline: course damping',
    help: "The same for a course's results. Default 5.",
  },
  satisfactionDampingStudent: {
    label: 'Satisfaction baseline: student damping',
    help: "How many average answers a student's own answers are blended with before they move the baseline. Default 5.",
  },
  satisfactionDampingCourse: {
    label: 'Satisfaction baseline: course damping',
    help: "The same for a course's answers. Default 5.",
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
  shrinkage: {
    label: 'Shrinkage (beta)',
    help: 'Each similarity is multiplied by n / (n + beta), n being the courses the two students share, so a likeness resting on few courses counts for less. 0 turns it off; default 25.',
  },
  tieDigits: {
    label: 'Ranking precision (digits)',
    help: 'Similarities are compared to this many significant digits when choosing kin, so equally similar students tie and the one first in order wins. 0 compares them as computed; default 12.',
  },
  alpha: {
    label: 'Fit weight alpha',
    help: 'How much the predicted grade counts in the fit score; satisfaction counts for the rest. From 0 to 1; 0.5 weighs them equally. It does not change the estimates themselves.',
  },
};

export const CENTRING_WORDS: Record<ModelSettings['centring'], string> = {
  baseline: 'on the baseline',
  studentMean: "on the student's average",
  none: 'off',
};

export const SOURCE_WORDS: Record<ModelSettings['gradeSimilarity'], string> = {
  grade: 'Grades',
  satisfaction: 'Satisfaction answers',
  both: 'Grades and satisfaction',
  enrolment: 'Courses taken (enrolment)',
  'satisfaction+enrolment': 'Satisfaction and enrolment',
};

/** One line naming every setting, for confirmations and result tables. */
export function describeSettings(s: ModelSettings): string {
  return [
    s.similarity === 'cosine' ? 'cosine' : 'Pearson',
    `IUF ${s.iuf ? 'on' : 'off'}`,
    `centring ${CENTRING_WORDS[s.centring]}`,
    `grade kin by ${s.gradeSimilarity}`,
    `satisfaction kin by ${s.satisfactionSimilarity}`,
    `damping grade ${s.gradeDampingStudent}/${s.gradeDampingCourse}, satisfaction ${s.satisfactionDampingStudent}/${s.satisfactionDampingCourse}`,
    `k ${s.k}`,
    `minimum kin ${s.minNeighbours}`,
    `minimum similarity ${s.minSimilarity}`,
    `significance ${s.significance === 0 ? 'off' : s.significance}`,
    `shrinkage ${s.shrinkage === 0 ? 'off' : s.shrinkage}`,
    `ranking digits ${s.tieDigits === 0 ? 'all' : s.tieDigits}`,
    `alpha ${s.alpha}`,
  ].join(', ');
}
