import { termOrdinal } from '@kinpath/contracts';
import { passes, type Attempt, type PassRule } from './attempts';

export interface Standing {
  creditsEarned: number;
  gradePointAverage: number | null;
}

/**
 * Credits earned and grade-point average from the records.
 *
 * - Credits earned: each course passed counts once, however often it was taken
 *   or passed, with the credits of its latest passing attempt (the catalogue's
 *   credits when the record has none). P passes and earns credits.
 * - Grade-point average: per course, only the latest attempt that carries grade
 *   points counts (the same attempt the model uses; marks such as W, P or I carry
 *   none and neither replace nor dilute an earlier grade), weighted by its
 *   credits attempted (else the catalogue's); null when no attempt counts.
 */
export function standing(
  attempts: readonly Attempt[],
  rule: PassRule,
  catalogueCredits: (courseCode: string) => number | null,
): Standing {
  const byTerm = [...attempts].sort((a, b) => termOrdinal(a.term) - termOrdinal(b.term));
  const lastPassed = new Map<string, Attempt>();
  const lastGraded = new Map<string, Attempt>();
  for (const a of byTerm) {
    if (passes(a, rule)) lastPassed.set(a.courseCode, a);
    if (a.gradePoints !== null) lastGraded.set(a.courseCode, a);
  }
  const creditsOf = (a: Attempt) => a.creditsAttempted ?? catalogueCredits(a.courseCode) ?? 0;
  let creditsEarned = 0;
  for (const a of lastPassed.values()) creditsEarned += creditsOf(a);
  let weighted = 0;
  let weights = 0;
  for (const a of lastGraded.values()) {
    const w = creditsOf(a);
    weighted += w * (a.gradePoints as number);
    weights += w;
  }
  return { creditsEarned, gradePointAverage: weights > 0 ? weighted / weights : null };
}
