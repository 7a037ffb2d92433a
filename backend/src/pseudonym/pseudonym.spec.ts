import { createHmac } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { hmacSha256Hex, normalizeStudentId, pseudonymFor } from './pseudonym';

describe('pseudonym', () => {
  it('computes HMAC-SHA256 as RFC 4231, test case 2, gives it', () => {
    // RFC 4231 "Identifiers and Test Vectors for HMAC-SHA-224, -256, -384, and -512", section 4.3.
    expect(hmacSha256Hex('Jefe', 'what do ya want for nothing?')).toBe(
      '5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843',
    );
  });

  it("agrees with Node's crypto for a student number", () => {
    const key = 'halden-reach-test-key';
    const expected = createHmac('sha256', key).update('HR0000001').digest('hex');
    expect(pseudonymFor(key, 'HR0000001')).toBe(expected);
  });

  it('ignores surrounding blanks and letter case of the student number', () => {
    const key = 'halden-reach-test-key';
    expect(normalizeStudentId('  hr0000001 ')).toBe('HR0000001');
    expect(pseudonymFor(key, ' hr0000001')).toBe(pseudonymFor(key, 'HR0000001'));
  });

  it('gives different pseudonyms under different keys and never contains the number', () => {
    const a = pseudonymFor('key-one-for-halden', 'HR0000001');
    const b = pseudonymFor('key-two-for-halden', 'HR0000001');
    expect(a).not.toBe(b);
    expect(a).toMatch(/^[0-9a-f]{64}$/);
    expect(a).not.toContain('0000001');
  });
});
