import type { LoginResponse } from '@kinpath/contracts';
import { ForbiddenException, Injectable, Logger, UnauthorizedException } from '@nestjs/common';
import { JwtService } from '@nestjs/jwt';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import type { User } from '../users/entities/user.entity';
import { decoyPasswordHash, verifyPassword } from '../users/passwords';
import { toSummary, UsersService } from '../users/users.service';
import { JWT_ALGORITHM, JwtSecret } from './jwt-secret';
import { ACCESS_TOKEN_TTL_SECONDS, type RequestSession } from './sessions';
import { SessionsService } from './sessions.service';
import { SignInThrottleService } from './sign-in-throttle.service';
import type { AccessTokenPayload } from './strategies/jwt.strategy';

/** One message for every refusal, so a reply never tells whether an address has an account. */
export const SIGN_IN_REFUSED = 'The e-mail address or password is not correct.';

/** Said only after the correct password, so it tells nothing to someone guessing. */
export function accountNotActive(adminEmails: string[]): string {
  const whom = adminEmails.length
    ? `a Kinpath administrator (${adminEmails.join(' or ')})`
    : 'a Kinpath administrator at your registrar’s office';
  return `Your Kinpath account is not active. Ask ${whom} to reactivate it.`;
}

@Injectable()
export class AuthService {
  private readonly logger = new Logger(AuthService.name);

  constructor(
    private readonly users: UsersService,
    private readonly jwt: JwtService,
    private readonly secret: JwtSecret,
    private readonly audit: AuditService,
    private readonly sessions: SessionsService,
    private readonly throttle: SignInThrottleService,
  ) {}

  async signIn(email: string, password: string, address: string): Promise<LoginResponse> {
    const emailKey = email.trim().toLowerCase();
    await this.throttle.admit(emailKey, address);
    const user = await this.users.findForSignIn(emailKey);
    // Compare even when there is no account, so both refusals take the same time.
    const hash = user?.passwordHash ?? (await decoyPasswordHash());
    const matches = await verifyPassword(password, hash);

    if (!user || !user.passwordHash || !matches || !user.active) {
      const reason = !user
        ? 'unknown_email'
        : !user.passwordHash
          ? 'no_password'
          : !matches
            ? 'wrong_password'
            : 'inactive';
      await this.audit.record({
        actor: user ? { id: user.id, email: user.email } : { email: emailKey.slice(0, 254) },
        action: AUDIT_ACTIONS.signInFailed,
        detail: { reason, address },
      });
      this.logger.log(`Sign-in refused (${reason}).`);
      // The right password for a deactivated account: not a guess, so not counted.
      if (reason === 'inactive') {
        throw new ForbiddenException(accountNotActive(await this.users.activeAdminEmails()));
      }
      await this.throttle.recordFailure(emailKey, address);
      throw new UnauthorizedException(SIGN_IN_REFUSED);
    }

    await this.throttle.recordSuccess(emailKey, address);
    const session = await this.sessions.start(user.id);
    await this.audit.record({
      actor: user,
      action: AUDIT_ACTIONS.signIn,
      target: user.id,
      detail: { session: session.id, address },
    });
    return this.issue(user, session);
  }

  /** A fresh access token for the same session, never outliving it. */
  async renew(user: User, session: RequestSession): Promise<LoginResponse> {
    await this.sessions.touch(session.id);
    return this.issue(user, session);
  }

  async signOut(user: User, session: RequestSession): Promise<void> {
    await this.sessions.end(session.id, 'signed_out');
    await this.audit.record({
      actor: user,
      action: AUDIT_ACTIONS.signOut,
      target: user.id,
      detail: { session: session.id },
    });
  }

  private async issue(user: User, session: RequestSession): Promise<LoginResponse> {
    const now = Math.floor(Date.now() / 1000);
    const sessionEnd = Math.floor(session.expiresAt.getTime() / 1000);
    const expiresIn = Math.max(1, Math.min(ACCESS_TOKEN_TTL_SECONDS, sessionEnd - now));
    const payload: AccessTokenPayload = { sub: user.id, ver: user.tokenVersion, sid: session.id };
    const accessToken = await this.jwt.signAsync(payload, {
      secret: this.secret.value,
      algorithm: JWT_ALGORITHM,
      expiresIn,
    });
    return {
      accessToken,
      user: toSummary(user),
      expiresAt: new Date((now + expiresIn) * 1000).toISOString(),
      sessionExpiresAt: session.expiresAt.toISOString(),
    };
  }
}
