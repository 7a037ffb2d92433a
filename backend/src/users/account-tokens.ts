import { createHash, randomBytes } from 'node:crypto';
import type { EntityManager } from 'typeorm';

export type AccountTokenPurpose = 'invitation' | 'password_reset';

/** How long a link stays usable. */
export const TOKEN_LIFETIME_MS: Record<AccountTokenPurpose, number> = {
  invitation: 72 * 60 * 60 * 1000,
  password_reset: 60 * 60 * 1000,
};

/** The database keeps this digest only, so a leaked table opens no account. */
export function tokenHash(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** 32 random bytes, URL-safe: at home in a link. */
export function newToken(): string {
  return randomBytes(32).toString('base64url');
}

/** Tokens of this form only; anything else is refused before it reaches the database. */
export const TOKEN_FORM = /^[A-Za-z0-9_-]{43}$/;

/** Ends every open token of this purpose for the user (a new link replaces older ones). */
export async function revokeOpenTokens(
  manager: EntityManager,
  userId: string,
  purpose: AccountTokenPurpose,
): Promise<number> {
  const rows: unknown[] = await manager.query(
    `UPDATE account_tokens SET revoked_at = now()
     WHERE user_id = $1 AND purpose = $2 AND used_at IS NULL AND revoked_at IS NULL
     RETURNING id`,
    [userId, purpose],
  );
  return (rows[0] as unknown[] | undefined)?.length ?? 0;
}

/** Replaces the user's open tokens of this purpose with a new one; returns the plain token. */
export async function issueToken(
  manager: EntityManager,
  userId: string,
  purpose: AccountTokenPurpose,
): Promise<{ token: string; expiresAt: Date }> {
  await revokeOpenTokens(manager, userId, purpose);
  const token = newToken();
  const expiresAt = new Date(Date.now() + TOKEN_LIFETIME_MS[purpose]);
  await manager.query(
    `INSERT INTO account_tokens (user_id, purpose, token_hash, expires_at) VALUES ($1, $2, $3, $4)`,
    [userId, purpose, tokenHash(token), expiresAt],
  );
  return { token, expiresAt };
}

/**
 * The user of a usable token, without spending it: a link is checked when it is opened, so a
 * spent or mistyped one says so before anyone types a password. Null as for `consumeToken`.
 */
export async function peekToken(
  manager: EntityManager,
  token: string,
  purpose: AccountTokenPurpose,
): Promise<string | null> {
  if (!TOKEN_FORM.test(token)) return null;
  const rows: Array<{ user_id: string }> = await manager.query(
    `SELECT user_id FROM account_tokens
     WHERE token_hash = $1 AND purpose = $2 AND used_at IS NULL AND revoked_at IS NULL
       AND expires_at > now()`,
    [tokenHash(token), purpose],
  );
  return rows[0]?.user_id ?? null;
}

/**
 * Marks a usable token as used and returns its user, in the caller's transaction;
 * null when the token is unknown, used, revoked or expired (one answer for all).
 */
export async function consumeToken(
  manager: EntityManager,
  token: string,
  purpose: AccountTokenPurpose,
): Promise<string | null> {
  if (!TOKEN_FORM.test(token)) return null;
  const rows: unknown = await manager.query(
    `UPDATE account_tokens SET used_at = now()
     WHERE token_hash = $1 AND purpose = $2 AND used_at IS NULL AND revoked_at IS NULL
       AND expires_at > now()
     RETURNING user_id`,
    [tokenHash(token), purpose],
  );
  const returned = (rows as [Array<{ user_id: string }>, number])[0];
  return returned?.[0]?.user_id ?? null;
}
