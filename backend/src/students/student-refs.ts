import { randomBytes } from 'node:crypto';

/** Refs are 16 URL-safe characters (96 random bits); anything else names no student. */
export const REF_PATTERN = /^[A-Za-z0-9_-]{16}$/;

export function newRef(): string {
  return randomBytes(12).toString('base64url');
}
