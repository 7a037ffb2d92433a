import { Injectable } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { User } from '../users/entities/user.entity';
import { type RequestSession, SESSION_MAX_AGE_SECONDS, type SessionEndReason } from './sessions';

/**
 * Sign-in sessions, one row each: a token names its session, so signing out in one
 * browser ends that session only, and the row's expiry bounds every renewal.
 */
@Injectable()
export class SessionsService {
  constructor(@InjectDataSource() private readonly dataSource: DataSource) {}

  async start(userId: string): Promise<RequestSession> {
    const rows: Array<{ id: string; expires_at: Date }> = await this.dataSource.query(
      `INSERT INTO sessions (user_id, expires_at)
       VALUES ($1, now() + make_interval(secs => $2))
       RETURNING id, expires_at`,
      [userId, SESSION_MAX_AGE_SECONDS],
    );
    return { id: rows[0].id, expiresAt: rows[0].expires_at };
  }

  /** The user, when the session is open and theirs; one query on every request. */
  async findUser(
    sessionId: string,
    userId: string,
  ): Promise<{ user: User; session: RequestSession } | null> {
    const row = await this.dataSource
      .getRepository(User)
      .createQueryBuilder('user')
      .innerJoin(
        'sessions',
        'session',
        'session.user_id = user.id AND session.id = :sessionId AND session.ended_at IS NULL AND session.expires_at > now()',
        { sessionId },
      )
      .addSelect('session.expires_at', 'session_expires_at')
      .where('user.id = :userId', { userId })
      .getRawAndEntities();
    const user = row.entities[0];
    if (!user) return null;
    const expiresAt = new Date(row.raw[0].session_expires_at as string | Date);
    return { user, session: { id: sessionId, expiresAt } };
  }

  /** Notes activity; renewal calls it, so a session's last use is known. */
  async touch(sessionId: string): Promise<void> {
    await this.dataSource.query(`UPDATE sessions SET last_seen_at = now() WHERE id = $1`, [
      sessionId,
    ]);
  }

  async end(sessionId: string, reason: SessionEndReason): Promise<void> {
    await this.dataSource.query(
      `UPDATE sessions SET ended_at = now(), end_reason = $2 WHERE id = $1 AND ended_at IS NULL`,
      [sessionId, reason],
    );
  }
}
