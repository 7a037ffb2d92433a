import type { Role } from '@kinpath/contracts';
import { CanActivate, ExecutionContext, ForbiddenException, Injectable } from '@nestjs/common';
import { Reflector } from '@nestjs/core';
import type { User } from '../users/entities/user.entity';
import { ROLES } from './decorators';

/** Global, after the token guard: a route with @Roles() answers 403 to any other role. */
@Injectable()
export class RolesGuard implements CanActivate {
  constructor(private readonly reflector: Reflector) {}

  canActivate(context: ExecutionContext): boolean {
    const roles = this.reflector.getAllAndOverride<Role[] | undefined>(ROLES, [
      context.getHandler(),
      context.getClass(),
    ]);
    if (!roles || roles.length === 0) return true;
    const user = context.switchToHttp().getRequest<{ user?: User }>().user;
    if (user && roles.includes(user.role)) return true;
    throw new ForbiddenException('This is not available for your role.');
  }
}
