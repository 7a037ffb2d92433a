/**
 * Terms are written `YYYY-XX` (data.md); within a year WI < SP < SU < FA.
 * Their string order is not their time order, so compare through `termOrdinal`.
 */
export const TERM_SEASONS = ['WI', 'SP', 'SU', 'FA'] as const;
export type TermSeason = (typeof TERM_SEASONS)[number];

export const TERM_PATTERN = /^(\d{4})-(WI|SP|SU|FA)$/;

export function isTerm(value: string): boolean {
  return TERM_PATTERN.test(value);
}

/** A number that grows by one from each term to the next: year * 4 + season index. */
export function termOrdinal(term: string): number {
  const match = TERM_PATTERN.exec(term);
  if (!match) throw new Error(`'${term}' is not a term of the form YYYY-XX (WI, SP, SU or FA).`);
  return Number(match[1]) * 4 + TERM_SEASONS.indexOf(match[2] as TermSeason);
}

export function termFromOrdinal(ordinal: number): string {
  const year = Math.floor(ordinal / 4);
  return `${String(year).padStart(4, '0')}-${TERM_SEASONS[ordinal - year * 4]}`;
}

/** Negative when `a` comes before `b`; usable with Array.prototype.sort. */
export function compareTerms(a: string, b: string): number {
  return termOrdinal(a) - termOrdinal(b);
}

export function nextTerm(term: string): string {
  return termFromOrdinal(termOrdinal(term) + 1);
}

export function previousTerm(term: string): string {
  return termFromOrdinal(termOrdinal(term) - 1);
}

export function sortTerms(terms: Iterable<string>): string[] {
  return [...new Set(terms)].sort(compareTerms);
}
