import { ExecutionContext, Injectable, UnauthorizedException } from '@nestjs/common';
import { Reflector } from '@nestjs/core';
import { AuthGuard } from '@nestjs/passport';
import { isDatabaseUnavailable } from '../common/http-error.filter';
import { IS_PUBLIC } from './decorators';

export const NOT_SIGNED_IN = 'Sign in to continue: the request has no valid access token.';

/** Global: every route needs a valid bearer token unless marked @Public(). */
@Injectable()
export class JwtAuthGuard extends AuthGuard('jwt') {
  constructor(private readonly reflector: Reflector) {
    super();
  }

  override canActivate(context: ExecutionContext) {
    const isPublic = this.reflector.getAllAndOverride<boolean>(IS_PUBLIC, [
      context.getHandler(),
      context.getClass(),
    ]);
    return isPublic ? true : super.canActivate(context);
  }

  override handleRequest<TUser>(error: unknown, user: TUser | false): TUser {
    // A database outage while checking the session is the server's trouble (503), not a
    // bad token: answering 401 would sign every user out of the web client.
    if (error && isDatabaseUnavailable(error)) throw error;
    if (error || !user) throw new UnauthorizedException(NOT_SIGNED_IN);
    return user;
  }
}
