import { applyDecorators, Injectable, UseGuards } from '@nestjs/common';
import { Reflector } from '@nestjs/core';
import { ApiTooManyRequestsResponse } from '@nestjs/swagger';
import {
  InjectThrottlerOptions,
  InjectThrottlerStorage,
  Throttle,
  ThrottlerGuard,
  type ThrottlerModuleOptions,
  type ThrottlerRequest,
  type ThrottlerStorage,
} from '@nestjs/throttler';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;

/**
 * Request limits of the routes that are costly or can be turned against others. Signed-in
 * routes count per user, public ones per client address. KINPATH_RATE_LIMIT_SCALE
 * multiplies every limit (the test suite's shared server raises them).
 */
export const RATE_LIMITS = {
  /** Sign-in attempts from one address, right or wrong (failures have their own counters). */
  signIn: { limit: 30, ttl: MINUTE, what: 'sign-in attempts' },
  /** Invitation and password-reset links: each request may send an e-mail. */
  accountLinks: { limit: 30, ttl: MINUTE, what: 'requests' },
  /** Backtests run the model over a whole past term. */
  backtest: { limit: 10, ttl: HOUR, what: 'backtests' },
  /** An outlook run reads every student's records for four terms. */
  outlookRun: { limit: 10, ttl: HOUR, what: 'outlook runs' },
  /** Summary e-mails go to any address the advisor types. */
  summaryMail: { limit: 10, ttl: 10 * MINUTE, what: 'summary e-mails' },
  /** Student look-ups by number: guessing numbers is how one would find students. */
  studentLookup: { limit: 60, ttl: MINUTE, what: 'student look-ups' },
} as const;
export type RateLimitName = keyof typeof RATE_LIMITS;

function span(ttl: number): string {
  return ttl >= HOUR
    ? `${ttl / HOUR} hour${ttl === HOUR ? '' : 's'}`
    : `${ttl / MINUTE} minute${ttl === MINUTE ? '' : 's'}`;
}

/** The 429 text: what was limited and when to try again (Retry-After carries the seconds). */
export function rateLimitMessage(seconds: number): string {
  const wait =
    seconds >= 90 ? `${Math.ceil(seconds / 60)} minutes` : `${Math.max(1, seconds)} seconds`;
  return `Too many requests of this kind. Try again in ${wait}.`;
}

/** Counts per user once signed in, else per client address; scales limits by the setting. */
@Injectable()
export class RateLimitGuard extends ThrottlerGuard {
  constructor(
    @InjectThrottlerOptions() options: ThrottlerModuleOptions,
    @InjectThrottlerStorage() storage: ThrottlerStorage,
    reflector: Reflector,
    @InjectConfig() private readonly config: AppConfig,
  ) {
    super(options, storage, reflector);
  }

  protected override async getTracker(req: Record<string, unknown>): Promise<string> {
    const user = req.user as { id?: string } | undefined;
    return user?.id ? `user:${user.id}` : `address:${String(req.ip)}`;
  }

  protected override async handleRequest(request: ThrottlerRequest): Promise<boolean> {
    return super.handleRequest({
      ...request,
      limit: Math.max(1, Math.round(request.limit * this.config.rateLimitScale)),
    });
  }
}

/** Applies one of the RATE_LIMITS to a route and documents it. */
export function RateLimit(name: RateLimitName) {
  const { limit, ttl, what } = RATE_LIMITS[name];
  return applyDecorators(
    UseGuards(RateLimitGuard),
    Throttle({ default: { limit, ttl } }),
    ApiTooManyRequestsResponse({
      description: `More than ${limit} ${what} in ${span(ttl)}; Retry-After says when to try again.`,
    }),
  );
}
