import { DEFAULT_MODEL_SETTINGS, sortTerms } from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';
import { completeSettings } from './model-settings.service';
import { termSortKey } from './term-keys';

describe('term keys for the engine', () => {
  it('sort as text in the registrar order WI < SP < SU < FA', () => {
    const terms = ['2024-FA', '2024-WI', '2025-WI', '2024-SU', '2024-SP', '2023-FA'];
    const byKey = [...terms].sort((a, b) => (termSortKey(a) < termSortKey(b) ? -1 : 1));
    expect(byKey).toEqual(sortTerms(terms));
    expect(termSortKey('2024-FA')).toBe('2024-4');
    expect(termSortKey('2025-WI')).toBe('2025-1');
  });

  it('refuses what is not a term', () => {
    expect(() => termSortKey('2024-XX')).toThrow(/not a term/);
  });
});

describe('stored settings', () => {
  it('keep only known settings and fill missing ones with the defaults', () => {
    expect(completeSettings({ k: 12, unknown: 1 } as never)).toEqual({
      ...DEFAULT_MODEL_SETTINGS,
      k: 12,
    });
  });
});
