import type { LoginResponse } from '@kinpath/contracts';
import { Injectable, Logger, UnauthorizedException } from '@nestjs/common';
import { JwtService } from '@nestjs/jwt';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { decoyPasswordHash, verifyPassword } from '../users/passwords';
import { toSummary, UsersService } from '../users/users.service';
import { ACCESS_TOKEN_TTL_SECONDS, JWT_ALGORITHM, JwtSecret } from './jwt-secret';
import type { AccessTokenPayload } from './strategies/jwt.strategy';

/** One message for every refusal, so a reply never tells whether an address has an account. */
export const SIGN_IN_REFUSED = 'The e-mail address or password is not correct.';

@Injectable()
export class AuthService {
  private readonly logger = new Logger(AuthService.name);

  constructor(
    private readonly users: UsersService,
    private readonly jwt: JwtService,
    private readonly secret: JwtSecret,
    private readonly audit: AuditService,
  ) {}

  async signIn(email: string, password: string): Promise<LoginResponse> {
    const address = email.trim().toLowerCase();
    const user = await this.users.findForSignIn(address);
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
        actor: user ? { id: user.id, email: user.email } : { email: address.slice(0, 254) },
        action: AUDIT_ACTIONS.signInFailed,
        detail: { reason },
      });
      this.logger.log(`Sign-in refused (${reason}).`);
      throw new UnauthorizedException(SIGN_IN_REFUSED);
    }

    const payload: AccessTokenPayload = { sub: user.id, ver: user.tokenVersion };
    const accessToken = await this.jwt.signAsync(payload, {
      secret: this.secret.value,
      algorithm: JWT_ALGORITHM,
      expiresIn: ACCESS_TOKEN_TTL_SECONDS,
    });
    await this.audit.record({ actor: user, action: AUDIT_ACTIONS.signIn, target: user.id });
    return { accessToken, user: toSummary(user) };
  }
}
