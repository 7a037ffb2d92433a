import type { ModelSettings } from '@kinpath/contracts';

/** The engine command line's options for stored settings, for one predicted signal. */
export function engineCliArgs(settings: ModelSettings, signal: 'grade' | 'satisfaction'): string[] {
  return [
    '--similarity',
    settings.similarity,
    '--iuf',
    settings.iuf ? 'on' : 'off',
    '--centring',
    settings.centring,
    '--source',
    signal === 'grade' ? settings.gradeSimilarity : settings.satisfactionSimilarity,
    '--damping-student',
    String(signal === 'grade' ? settings.gradeDampingStudent : settings.satisfactionDampingStudent),
    '--damping-course',
    String(signal === 'grade' ? settings.gradeDampingCourse : settings.satisfactionDampingCourse),
    '--shrinkage',
    String(settings.shrinkage),
    '--tie-digits',
    String(settings.tieDigits),
    '--k',
    String(settings.k),
    '--min-neighbours',
    String(settings.minNeighbours),
    `--min-similarity=${settings.minSimilarity}`,
    '--significance',
    String(settings.significance),
  ];
}
