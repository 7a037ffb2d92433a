import { PASSWORD_MIN_LENGTH } from '@kinpath/contracts';
import { registerDecorator, type ValidationOptions } from 'class-validator';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';

export const PASSWORD_MAX_LENGTH = 200;
export const PASSWORD_TOO_SHORT = `Password must be at least ${PASSWORD_MIN_LENGTH} characters.`;
export const PASSWORD_TOO_COMMON =
  'This password is too common or too easy to guess: choose a longer phrase of your own.';

// The list stays in src/ (tsc copies no text files); both src/auth and dist/auth sit two levels
// below the backend folder, so one relative path finds it from either.
const LIST_FILE = resolve(__dirname, '..', '..', 'src', 'auth', 'common-passwords.txt');

let common: Set<string> | undefined;
function commonPasswords(): Set<string> {
  common ??= new Set(
    readFileSync(LIST_FILE, 'utf8')
      .split('\n')
      .map((line) => line.trim())
      .filter((line) => line.length > 0 && !line.startsWith('#')),
  );
  return common;
}

/** Why a password is refused, or null when it is acceptable. */
export function passwordProblem(password: string): string | null {
  if (password.length < PASSWORD_MIN_LENGTH) return PASSWORD_TOO_SHORT;
  if (password.length > PASSWORD_MAX_LENGTH) {
    return `Password must be at most ${PASSWORD_MAX_LENGTH} characters.`;
  }
  const lower = password.toLowerCase();
  if (new Set(lower).size < 4) return PASSWORD_TOO_COMMON;
  const list = commonPasswords();
  if (list.has(lower)) return PASSWORD_TOO_COMMON;
  // A listed password with digits or symbols tacked on ("dragon2024!") is no stronger.
  const core = lower.replace(/[\d\W_]+$/, '').replace(/^[\d\W_]+/, '');
  if (core.length >= 4 && core !== lower && list.has(core)) return PASSWORD_TOO_COMMON;
  return null;
}

/** class-validator: a string that passes `passwordProblem`, with its sentence as the message. */
export function IsAcceptablePassword(options?: ValidationOptions): PropertyDecorator {
  return (target: object, propertyName: string | symbol) =>
    registerDecorator({
      name: 'isAcceptablePassword',
      target: target.constructor,
      propertyName: String(propertyName),
      options,
      validator: {
        validate: (value: unknown) => typeof value === 'string' && passwordProblem(value) === null,
        defaultMessage: (args) =>
          typeof args?.value === 'string'
            ? (passwordProblem(args.value) ?? PASSWORD_TOO_COMMON)
            : 'Password is required.',
      },
    });
}
