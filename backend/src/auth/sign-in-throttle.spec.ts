import { describe, expect, it } from 'vitest';
import {
  ACCOUNT_SLOWDOWN_AFTER,
  SLOWDOWN_FIRST_MS,
  SLOWDOWN_MAX_MS,
  slowDownMs,
} from './sign-in-throttle.service';

describe('slowDownMs', () => {
  it('does not slow an account until it has had its share of failures', () => {
    for (let f = 0; f < ACCOUNT_SLOWDOWN_AFTER; f++) expect(slowDownMs(f)).toBe(0);
  });

  it('then doubles from the first wait up to the cap, and never refuses', () => {
    const waits = [0, 1, 2, 3, 4, 10, 1000].map((n) => slowDownMs(ACCOUNT_SLOWDOWN_AFTER + n));
    expect(waits).toEqual([
      SLOWDOWN_FIRST_MS,
      2 * SLOWDOWN_FIRST_MS,
      4 * SLOWDOWN_FIRST_MS,
      SLOWDOWN_MAX_MS,
      SLOWDOWN_MAX_MS,
      SLOWDOWN_MAX_MS,
      SLOWDOWN_MAX_MS,
    ]);
  });
});
