import { Injectable } from '@nestjs/common';
import { PassportStrategy } from '@nestjs/passport';
import type { Request } from 'express';
import { ExtractJwt, Strategy } from 'passport-jwt';
import type { User } from '../../users/entities/user.entity';
import { JWT_ALGORITHM, JwtSecret } from '../jwt-secret';
import type { RequestSession } from '../sessions';
import { SessionsService } from '../sessions.service';

export interface AccessTokenPayload {
  sub: string;
  /** The user's token_version when the token was issued. */
  ver: number;
  /** The session the token belongs to; signing out ends it. */
  sid: string;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The request after the token guard: the user and the session of the token. */
export type SignedInRequest = Request & { user: User; kinpathSession: RequestSession };

/**
 * Checks the signature and expiry, then re-reads the user with the token's session
 * so a sign-out, a deactivation, a role change or a raised token version applies
 * on the next request.
 */
@Injectable()
export class JwtStrategy extends PassportStrategy(Strategy) {
  constructor(
    secret: JwtSecret,
    private readonly sessions: SessionsService,
  ) {
    super({
      jwtFromRequest: ExtractJwt.fromAuthHeaderAsBearerToken(),
      // jsonwebtoken accepts a KeyObject here; passport-jwt's types predate that.
      secretOrKey: secret.verificationKey as unknown as Buffer,
      algorithms: [JWT_ALGORITHM],
      ignoreExpiration: false,
      passReqToCallback: true,
    });
  }

  async validate(req: Request, payload: AccessTokenPayload): Promise<User | false> {
    if (typeof payload.sub !== 'string' || typeof payload.ver !== 'number') return false;
    if (typeof payload.sid !== 'string' || !UUID.test(payload.sid) || !UUID.test(payload.sub)) {
      return false;
    }
    const found = await this.sessions.findUser(payload.sid, payload.sub);
    if (!found || !found.user.active || found.user.tokenVersion !== payload.ver) return false;
    (req as SignedInRequest).kinpathSession = found.session;
    return found.user;
  }
}
