import { createHmac } from 'node:crypto';

/** HMAC-SHA256 of a UTF-8 message under a UTF-8 key, as lower-case hex. */
export function hmacSha256Hex(key: string | Buffer, message: string): string {
  return createHmac('sha256', key).update(message, 'utf8').digest('hex');
}

/**
 * Student numbers are compared without surrounding blanks and case, so `hr0000001 `
 * typed at the desk finds the records imported as `HR0000001`.
 */
export function normalizeStudentId(studentId: string): string {
  return studentId.trim().toUpperCase();
}

export function pseudonymFor(key: string | Buffer, studentId: string): string {
  return hmacSha256Hex(key, normalizeStudentId(studentId));
}
