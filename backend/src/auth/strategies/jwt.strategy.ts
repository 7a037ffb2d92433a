import { Injectable } from '@nestjs/common';
import { PassportStrategy } from '@nestjs/passport';
import { ExtractJwt, Strategy } from 'passport-jwt';
import type { User } from '../../users/entities/user.entity';
import { UsersService } from '../../users/users.service';
import { JWT_ALGORITHM, JwtSecret } from '../jwt-secret';

export interface AccessTokenPayload {
  sub: string;
  /** The user's token_version when the token was issued. */
  ver: number;
}

/**
 * Checks the signature and expiry, then re-reads the user by primary key so a
 * deactivation, a role change or a raised token version applies on the next request.
 */
@Injectable()
export class JwtStrategy extends PassportStrategy(Strategy) {
  constructor(
    secret: JwtSecret,
    private readonly users: UsersService,
  ) {
    super({
      jwtFromRequest: ExtractJwt.fromAuthHeaderAsBearerToken(),
      secretOrKey: secret.value,
      algorithms: [JWT_ALGORITHM],
      ignoreExpiration: false,
    });
  }

  async validate(payload: AccessTokenPayload): Promise<User | false> {
    if (typeof payload.sub !== 'string' || typeof payload.ver !== 'number') return false;
    const user = await this.users.findById(payload.sub);
    if (!user || !user.active || user.tokenVersion !== payload.ver) return false;
    return user;
  }
}
