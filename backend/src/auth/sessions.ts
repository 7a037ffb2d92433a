import type { EntityManager } from 'typeorm';

/** An access token lives 15 minutes and is renewed while the user is active. */
export const ACCESS_TOKEN_TTL_SECONDS = 15 * 60;
/** No renewal carries a session past 12 hours from its sign-in. */
export const SESSION_MAX_AGE_SECONDS = 12 * 60 * 60;

export type SessionEndReason = 'signed_out' | 'deactivated' | 'password_changed';

/** The session a request's token belongs to, set on the request by the token strategy. */
export interface RequestSession {
  id: string;
  expiresAt: Date;
}

/** Ends every open session of a user at once, inside the caller's transaction. */
export async function endUserSessions(
  manager: EntityManager,
  userId: string,
  reason: SessionEndReason,
): Promise<void> {
  await manager.query(
    `UPDATE sessions SET ended_at = now(), end_reason = $2 WHERE user_id = $1 AND ended_at IS NULL`,
    [userId, reason],
  );
}
