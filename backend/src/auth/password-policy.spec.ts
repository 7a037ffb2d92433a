import { describe, expect, it } from 'vitest';
import { PASSWORD_TOO_COMMON, PASSWORD_TOO_SHORT, passwordProblem } from './password-policy';

describe('password policy', () => {
  it('refuses short passwords', () => {
    expect(passwordProblem('short-pass')).toBe(PASSWORD_TOO_SHORT);
  });

  it('refuses listed passwords in any case, and listed ones with digits tacked on', () => {
    for (const password of [
      'qwertyuiop123',
      'QWERTY123456',
      '1qaz2wsx3edc',
      'sunshine2024!',
      '!!password1234',
    ]) {
      expect(passwordProblem(password), password).toBe(PASSWORD_TOO_COMMON);
    }
  });

  it('refuses passwords of very few distinct characters', () => {
    expect(passwordProblem('aaaaaaaaaaaaaaa')).toBe(PASSWORD_TOO_COMMON);
    expect(passwordProblem('121212121212')).toBe(PASSWORD_TOO_COMMON);
  });

  it('accepts a long phrase of one’s own', () => {
    expect(passwordProblem('heron-ledger-quietly-9')).toBeNull();
    expect(passwordProblem('kinpath-demo-2026')).toBeNull();
  });
});
