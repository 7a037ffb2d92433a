import { TERM_PATTERN, TERM_SEASONS, type TermSeason } from '@kinpath/contracts';

/**
 * A key whose string order is the registrar's time order: `2024-FA` becomes
 * `2024-4`, `2025-WI` becomes `2025-1`. The engine (and its command line) order
 * attempts by comparing term strings, and `FA < SP < SU < WI` as text.
 */
export function termSortKey(term: string): string {
  const match = TERM_PATTERN.exec(term);
  if (!match) throw new Error(`'${term}' is not a term of the form YYYY-XX (WI, SP, SU or FA).`);
  return `${match[1]}-${TERM_SEASONS.indexOf(match[2] as TermSeason) + 1}`;
}

/** The term of an engine key (the inverse of termSortKey): "2026-2" is 2026-SP. */
export function termOfSortKey(key: string): string {
  const match = /^(\d{4})-(\d)$/.exec(key);
  const season = match ? TERM_SEASONS[Number(match[2]) - 1] : undefined;
  return match && season ? `${match[1]}-${season}` : key;
}
