import { describe, expect, it } from 'vitest';
import { holdsBadText, jsonDepthExceeds, MAX_JSON_DEPTH } from './input-checks';

describe('jsonDepthExceeds', () => {
  const nested = (n: number) => Buffer.from('['.repeat(n) + ']'.repeat(n));

  it('allows the limit and refuses one level more', () => {
    expect(jsonDepthExceeds(nested(MAX_JSON_DEPTH))).toBe(false);
    expect(jsonDepthExceeds(nested(MAX_JSON_DEPTH + 1))).toBe(true);
  });

  it('ignores brackets inside strings, escaped quotes included', () => {
    const text = JSON.stringify({ note: '['.repeat(100) + '\\"{{{{' + '"'.repeat(3) });
    expect(jsonDepthExceeds(Buffer.from(text))).toBe(false);
  });

  it('counts depth, not the number of brackets', () => {
    const wide = JSON.stringify(Array.from({ length: 500 }, () => ({ a: [1] })));
    expect(jsonDepthExceeds(Buffer.from(wide))).toBe(false);
  });
});

describe('holdsBadText', () => {
  it('finds a NUL or a lone surrogate anywhere, keys included', () => {
    expect(holdsBadText({ a: ['ok', { b: 'x\u0000' }] })).toBe(true);
    expect(holdsBadText({ email: '\ud800@halden.example' })).toBe(true);
    expect(holdsBadText({ email: 'a\udc00' })).toBe(true);
    expect(holdsBadText({ ['k\u0000']: 1 })).toBe(true);
  });

  it('accepts ordinary text, emoji (a proper surrogate pair) and non-strings', () => {
    expect(holdsBadText({ name: 'Åsa Ñúñez 😀', n: 3, ok: true, none: null })).toBe(false);
  });
});
