import { HttpException, HttpStatus, Injectable, Logger } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';

/** Failures are counted over this window… */
export const THROTTLE_WINDOW_MINUTES = 15;
/** …and this many for one account, or from one address, start a cooling period… */
export const ACCOUNT_FAILURE_LIMIT = 5;
export const ADDRESS_FAILURE_LIMIT = 20;
/** …of this length, during which every attempt answers 429. */
export const COOLING_MINUTES = 15;

/** A 429 that names the wait; the error filter turns `retryAfterSeconds` into Retry-After. */
export class SignInThrottledException extends HttpException {
  constructor(readonly retryAfterSeconds: number) {
    const minutes = Math.max(1, Math.ceil(retryAfterSeconds / 60));
    super(
      `Too many failed sign-in attempts. Sign-in is paused for ${minutes} ${minutes === 1 ? 'minute' : 'minutes'}; try again after that, or reset the password.`,
      HttpStatus.TOO_MANY_REQUESTS,
    );
  }
}

type Scope = 'account' | 'address';

/**
 * Counts failed sign-ins per account (by e-mail, known or not, so the answer never
 * tells which) and per client address, in the database so every server process agrees.
 * Only failures count: a successful sign-in clears its account's counter.
 */
@Injectable()
export class SignInThrottleService {
  private readonly logger = new Logger(SignInThrottleService.name);

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly audit: AuditService,
  ) {}

  /** Throws the 429 when the account or the address is cooling down. */
  async assertAllowed(email: string, address: string): Promise<void> {
    const rows: Array<{ wait: number }> = await this.dataSource.query(
      `SELECT ceil(extract(epoch FROM max(blocked_until) - now()))::integer AS wait
       FROM sign_in_throttle WHERE key = ANY($1) AND blocked_until > now()`,
      [[key('account', email), key('address', address)]],
    );
    const wait = rows[0]?.wait;
    if (wait !== null && wait !== undefined && wait > 0) throw new SignInThrottledException(wait);
  }

  async recordFailure(email: string, address: string): Promise<void> {
    for (const [scope, value, limit] of [
      ['account', email, ACCOUNT_FAILURE_LIMIT],
      ['address', address, ADDRESS_FAILURE_LIMIT],
    ] as const) {
      const started = await this.count(key(scope, value), limit);
      if (started) {
        this.logger.warn(`Sign-in paused for one ${scope} after ${limit} failures.`);
        await this.audit.record({
          actor: scope === 'account' ? { email: email.slice(0, 254) } : null,
          action: AUDIT_ACTIONS.signInThrottled,
          detail: {
            scope,
            ...(scope === 'address' ? { address } : {}),
            failures: limit,
            windowMinutes: THROTTLE_WINDOW_MINUTES,
            coolingMinutes: COOLING_MINUTES,
          },
        });
      }
    }
  }

  async recordSuccess(email: string): Promise<void> {
    await this.dataSource.query(`DELETE FROM sign_in_throttle WHERE key = $1`, [
      key('account', email),
    ]);
  }

  /** Adds one failure; true when this failure starts a cooling period. */
  private async count(throttleKey: string, limit: number): Promise<boolean> {
    // A window that has passed, or a cooling period that is over, starts the count afresh.
    const rows: Array<{ started: boolean }> = await this.dataSource.query(
      `WITH previous AS (
         SELECT failures, window_started_at, blocked_until FROM sign_in_throttle WHERE key = $1
       )
       INSERT INTO sign_in_throttle AS t (key, failures, window_started_at, blocked_until)
       VALUES ($1, 1, now(), CASE WHEN 1 >= $2 THEN now() + make_interval(mins => $4) END)
       ON CONFLICT (key) DO UPDATE SET
         failures = CASE WHEN t.window_started_at < now() - make_interval(mins => $3)
                          OR t.blocked_until <= now() THEN 1 ELSE t.failures + 1 END,
         window_started_at = CASE WHEN t.window_started_at < now() - make_interval(mins => $3)
                                   OR t.blocked_until <= now() THEN now() ELSE t.window_started_at END,
         blocked_until = CASE
           WHEN t.window_started_at < now() - make_interval(mins => $3) OR t.blocked_until <= now()
             THEN NULL
           WHEN t.failures + 1 >= $2 THEN now() + make_interval(mins => $4)
           ELSE t.blocked_until END
       RETURNING (t.blocked_until IS NOT NULL
                  AND NOT EXISTS (SELECT 1 FROM previous WHERE blocked_until > now())) AS started`,
      [throttleKey, limit, THROTTLE_WINDOW_MINUTES, COOLING_MINUTES],
    );
    return rows[0]?.started === true;
  }
}

function key(scope: Scope, value: string): string {
  return `${scope}:${value.trim().toLowerCase().slice(0, 300)}`;
}
