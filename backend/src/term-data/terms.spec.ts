import {
  compareTerms,
  isTerm,
  nextTerm,
  previousTerm,
  sortTerms,
  termOrdinal,
} from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';

describe('terms', () => {
  it('orders the seasons of one year WI < SP < SU < FA', () => {
    expect(sortTerms(['2025-FA', '2025-WI', '2025-SU', '2025-SP'])).toEqual([
      '2025-WI',
      '2025-SP',
      '2025-SU',
      '2025-FA',
    ]);
  });

  it('orders years before seasons and removes repeats', () => {
    expect(sortTerms(['2026-WI', '2025-FA', '2024-SU', '2025-FA'])).toEqual([
      '2024-SU',
      '2025-FA',
      '2026-WI',
    ]);
    expect(compareTerms('2025-FA', '2026-WI')).toBeLessThan(0);
    expect(compareTerms('2026-WI', '2026-WI')).toBe(0);
  });

  it('steps to the next and previous term across a year', () => {
    expect(nextTerm('2025-SP')).toBe('2025-SU');
    expect(nextTerm('2025-FA')).toBe('2026-WI');
    expect(previousTerm('2026-WI')).toBe('2025-FA');
    expect(termOrdinal(nextTerm('2019-FA'))).toBe(termOrdinal('2019-FA') + 1);
  });

  it('accepts only YYYY-XX with a known season', () => {
    expect(isTerm('2025-FA')).toBe(true);
    for (const bad of ['2025-fa', '2025FA', '25-FA', '2025-AU', '2025-FA ', '']) {
      expect(isTerm(bad)).toBe(false);
    }
    expect(() => termOrdinal('2025-XX')).toThrow(/not a term/);
  });
});
