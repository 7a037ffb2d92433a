import { HttpException, HttpStatus, Injectable, Logger } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';

/** Failures are counted over this window… */
export const THROTTLE_WINDOW_MINUTES = 15;
/** …and this many for one account from one address, or from one address in all, start a pause… */
export const PAIR_FAILURE_LIMIT = 5;
export const ADDRESS_FAILURE_LIMIT = 20;
/** …of this length, during which that pair's (or address's) attempts answer 429. */
export const COOLING_MINUTES = 15;
/**
 * An account is never paused for everyone: a stranger could keep it shut. Past this many
 * failures from anywhere, each attempt on it waits first, longer with each failure.
 */
export const ACCOUNT_SLOWDOWN_AFTER = 5;
export const SLOWDOWN_FIRST_MS = 1_000;
export const SLOWDOWN_MAX_MS = 8_000;

/** The wait before an attempt on an account with this many recent failures. */
export function slowDownMs(failures: number): number {
  if (failures < ACCOUNT_SLOWDOWN_AFTER) return 0;
  return Math.min(SLOWDOWN_MAX_MS, SLOWDOWN_FIRST_MS * 2 ** (failures - ACCOUNT_SLOWDOWN_AFTER));
}

/** A 429 that names the wait; the error filter turns `retryAfterSeconds` into Retry-After. */
export class SignInThrottledException extends HttpException {
  constructor(readonly retryAfterSeconds: number) {
    const minutes = Math.max(1, Math.ceil(retryAfterSeconds / 60));
    super(
      `Too many failed sign-in attempts from this address. Sign-in from here is paused for ${minutes} ${minutes === 1 ? 'minute' : 'minutes'}; try again after that, or reset the password.`,
      HttpStatus.TOO_MANY_REQUESTS,
    );
  }
}

type Scope = 'account_address' | 'address' | 'account';

/**
 * Counts failed sign-ins per account and address, per address, and per account (by
 * e-mail, known or not, so the answer never tells which), in the database so every
 * server process agrees. Only failures count: a successful sign-in clears its account's
 * counters. Pauses fall on the address that failed; the account itself is only slowed.
 */
@Injectable()
export class SignInThrottleService {
  private readonly logger = new Logger(SignInThrottleService.name);

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly audit: AuditService,
  ) {}

  /**
   * Throws the 429 when this address is paused, for this account or for all; otherwise
   * waits as long as the account's recent failures ask, then lets the attempt through.
   */
  async admit(email: string, address: string): Promise<void> {
    const rows: Array<{ key: string; wait: number | null; failures: number }> =
      await this.dataSource.query(
        `SELECT key,
                CASE WHEN blocked_until > now()
                  THEN ceil(extract(epoch FROM blocked_until - now()))::integer END AS wait,
                CASE WHEN window_started_at > now() - make_interval(mins => $2)
                  THEN failures ELSE 0 END AS failures
         FROM sign_in_throttle WHERE key = ANY($1)`,
        [
          [pairKey(email, address), key('address', address), key('account', email)],
          THROTTLE_WINDOW_MINUTES,
        ],
      );
    const wait = Math.max(
      0,
      ...rows.filter((r) => r.key !== key('account', email)).map((r) => r.wait ?? 0),
    );
    if (wait > 0) throw new SignInThrottledException(wait);
    const failures = rows.find((r) => r.key === key('account', email))?.failures ?? 0;
    const delay = slowDownMs(failures);
    if (delay > 0) await new Promise((resolve) => setTimeout(resolve, delay));
  }

  async recordFailure(email: string, address: string): Promise<void> {
    const counters: Array<[Scope, string, number]> = [
      ['account_address', pairKey(email, address), PAIR_FAILURE_LIMIT],
      ['address', key('address', address), ADDRESS_FAILURE_LIMIT],
      // Never paused (no limit); its count sets the slow-down.
      ['account', key('account', email), 2 ** 30],
    ];
    for (const [scope, throttleKey, limit] of counters) {
      const { started, failures } = await this.count(throttleKey, limit);
      const slowed = scope === 'account' && failures === ACCOUNT_SLOWDOWN_AFTER;
      if (!started && !slowed) continue;
      this.logger.warn(
        scope === 'account'
          ? `Sign-in slowed for one account after ${failures} failures.`
          : `Sign-in paused for one ${scope === 'address' ? 'address' : 'account and address'} after ${limit} failures.`,
      );
      await this.audit.record({
        actor: scope === 'address' ? null : { email: email.slice(0, 254) },
        action: AUDIT_ACTIONS.signInThrottled,
        detail: {
          scope,
          address,
          failures,
          windowMinutes: THROTTLE_WINDOW_MINUTES,
          ...(scope === 'account'
            ? { slowDownSeconds: slowDownMs(failures) / 1000 }
            : { coolingMinutes: COOLING_MINUTES }),
        },
      });
    }
  }

  /** A correct password clears the account's slow-down and this address's count for it. */
  async recordSuccess(email: string, address: string): Promise<void> {
    await this.dataSource.query(`DELETE FROM sign_in_throttle WHERE key = ANY($1)`, [
      [key('account', email), pairKey(email, address)],
    ]);
  }

  /** Adds one failure; says whether it starts a pause, and the count in the window. */
  private async count(
    throttleKey: string,
    limit: number,
  ): Promise<{ started: boolean; failures: number }> {
    // A window that has passed, or a pause that is over, starts the count afresh.
    const rows: Array<{ started: boolean; failures: number }> = await this.dataSource.query(
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
                  AND NOT EXISTS (SELECT 1 FROM previous WHERE blocked_until > now())) AS started,
                 t.failures`,
      [throttleKey, limit, THROTTLE_WINDOW_MINUTES, COOLING_MINUTES],
    );
    return { started: rows[0]?.started === true, failures: rows[0]?.failures ?? 1 };
  }
}

function key(scope: 'address' | 'account', value: string): string {
  return `${scope}:${value.trim().toLowerCase().slice(0, 300)}`;
}

function pairKey(email: string, address: string): string {
  return `pair:${email.trim().toLowerCase().slice(0, 254)}|${address.trim().slice(0, 64)}`;
}
