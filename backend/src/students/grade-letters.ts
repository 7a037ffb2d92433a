import type { GradeScaleLetter } from '@kinpath/contracts';

/**
 * The scale's letter nearest to a predicted grade. Halfway between two letters
 * the lower one is given: an estimate should not read better than it is.
 */
export function nearestLetter(
  points: number | null,
  letters: readonly GradeScaleLetter[],
): string | null {
  if (points === null || letters.length === 0) return null;
  let best = letters[0];
  let bestGap = Math.abs(points - best.points);
  for (const entry of letters.slice(1)) {
    const gap = Math.abs(points - entry.points);
    // A tiny tolerance so 3.15 between B (3.0) and B+ (3.3) counts as halfway despite rounding.
    if (gap < bestGap - 1e-9 || (Math.abs(gap - bestGap) <= 1e-9 && entry.points < best.points)) {
      best = entry;
      bestGap = gap;
    }
  }
  return best.letter;
}
