import type { NextFunction, Request, Response } from 'express';

/** Deeper JSON than this is refused before parsing: no request of ours nests past a few levels. */
export const MAX_JSON_DEPTH = 32;

/** A refusal raised by the body checks; the error filter turns `type` into its message. */
export class InputRefusal extends Error {
  readonly status = 400;
  readonly expose = true;
  constructor(readonly type: 'entity.too.deep' | 'entity.bad.text') {
    super(type);
  }
}

export const INPUT_REFUSAL_MESSAGES: Record<string, string> = {
  'entity.too.deep': `The request body is nested too deeply (at most ${MAX_JSON_DEPTH} levels).`,
  'entity.bad.text':
    'The request holds text that is not valid: a NUL character or a broken Unicode character.',
};

/**
 * The nesting depth of a JSON text, counted on the raw bytes (brackets outside strings).
 * UTF-8 multi-byte sequences never contain ASCII bytes, so no decoding is needed.
 */
export function jsonDepthExceeds(body: Buffer, maxDepth = MAX_JSON_DEPTH): boolean {
  let depth = 0;
  let inString = false;
  for (let i = 0; i < body.length; i++) {
    const byte = body[i];
    if (inString) {
      if (byte === 0x5c)
        i++; // backslash: skip the escaped character
      else if (byte === 0x22) inString = false;
    } else if (byte === 0x22) inString = true;
    else if (byte === 0x5b || byte === 0x7b) {
      if (++depth > maxDepth) return true;
    } else if (byte === 0x5d || byte === 0x7d) depth--;
  }
  return false;
}

/** The body parser's `verify` hook: runs on the raw bytes, before JSON.parse can recurse. */
export function verifyJsonDepth(_req: unknown, _res: unknown, body: Buffer): void {
  if (jsonDepthExceeds(body)) throw new InputRefusal('entity.too.deep');
}

// A NUL (PostgreSQL text cannot hold one) or a surrogate half without its partner.
// eslint-disable-next-line no-control-regex -- finding NUL is the point
const BAD_TEXT = /\u0000|[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;

/** Whether any string (or object key) in a parsed body or query is not valid text. */
export function holdsBadText(value: unknown, depth = 0): boolean {
  if (typeof value === 'string') return BAD_TEXT.test(value);
  if (value === null || typeof value !== 'object' || depth > MAX_JSON_DEPTH + 1) return false;
  if (Array.isArray(value)) return value.some((v) => holdsBadText(v, depth + 1));
  for (const [k, v] of Object.entries(value)) {
    if (BAD_TEXT.test(k) || holdsBadText(v, depth + 1)) return true;
  }
  return false;
}

/** Refuses a request whose body, query or path holds text no column or e-mail can take. */
export function rejectBadText(req: Request, _res: Response, next: NextFunction): void {
  let path: string;
  try {
    path = decodeURIComponent(req.path);
  } catch {
    path = '\u0000'; // a broken %-escape
  }
  if (holdsBadText(path) || holdsBadText(req.query) || holdsBadText(req.body)) {
    next(new InputRefusal('entity.bad.text'));
    return;
  }
  next();
}
