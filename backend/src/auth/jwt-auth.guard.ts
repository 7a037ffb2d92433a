import { API_TOKEN_PREFIX, type ApiTokenScope } from '@kinpath/contracts';
import { ExecutionContext, Injectable, UnauthorizedException } from '@nestjs/common';
import { Reflector } from '@nestjs/core';
import { AuthGuard } from '@nestjs/passport';
import type { Request } from 'express';
import { ApiTokensService } from '../api-tokens/api-tokens.service';
import { isDatabaseUnavailable } from '../common/http-error.filter';
import { IS_PUBLIC, SCOPES } from './decorators';

export const NOT_SIGNED_IN = 'Sign in to continue: the request has no valid access token.';

const SCRIPT_TOKEN = new RegExp(`^Bearer\\s+(${API_TOKEN_PREFIX}\\S+)$`);

/**
 * Global: every route needs a valid bearer token unless marked @Public(). The one place that
 * also admits script tokens (`Bearer kp_…`): only on routes with a matching @Scopes(), so a
 * script token never reaches the session, account or token routes.
 */
@Injectable()
export class JwtAuthGuard extends AuthGuard('jwt') {
  constructor(
    private readonly reflector: Reflector,
    private readonly apiTokens: ApiTokensService,
  ) {
    super();
  }

  override canActivate(context: ExecutionContext) {
    const targets = [context.getHandler(), context.getClass()];
    const isPublic = this.reflector.getAllAndOverride<boolean>(IS_PUBLIC, targets);
    if (isPublic) return true;
    const req = context.switchToHttp().getRequest<Request & { user?: unknown }>();
    const secret = SCRIPT_TOKEN.exec(req.headers.authorization ?? '')?.[1];
    if (secret === undefined) return super.canActivate(context);
    const scopes = this.reflector.getAllAndOverride<ApiTokenScope[]>(SCOPES, targets) ?? [];
    return this.apiTokens.authenticate(secret, scopes).then((owner) => {
      req.user = owner;
      return true;
    });
  }

  override handleRequest<TUser>(error: unknown, user: TUser | false): TUser {
    // A database outage while checking the session is the server's trouble (503), not a
    // bad token: answering 401 would sign every user out of the web client.
    if (error && isDatabaseUnavailable(error)) throw error;
    if (error || !user) throw new UnauthorizedException(NOT_SIGNED_IN);
    return user;
  }
}
