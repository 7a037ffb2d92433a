import type { ApiTokenScope, Role } from '@kinpath/contracts';
import {
  applyDecorators,
  createParamDecorator,
  ExecutionContext,
  SetMetadata,
} from '@nestjs/common';
import {
  ApiBearerAuth,
  ApiExtension,
  ApiForbiddenResponse,
  ApiUnauthorizedResponse,
} from '@nestjs/swagger';
import type { User } from '../users/entities/user.entity';
import type { RequestSession } from './sessions';

export const IS_PUBLIC = 'kinpath:public';
export const ROLES = 'kinpath:roles';
export const SCOPES = 'kinpath:scopes';

/** OpenAPI extensions that state each route's access, for readers and the authorization tests. */
export const OPENAPI_PUBLIC = 'x-kinpath-public';
export const OPENAPI_ROLES = 'x-kinpath-roles';
export const OPENAPI_SCOPES = 'x-kinpath-token-scopes';

/** Opens a route to anyone; every other route needs a valid token. */
export const Public = () =>
  applyDecorators(SetMetadata(IS_PUBLIC, true), ApiExtension(OPENAPI_PUBLIC, true));

/** Limits a route (or every route of a controller) to these roles; others get 403. */
export const Roles = (...roles: Role[]) =>
  applyDecorators(
    SetMetadata(ROLES, roles),
    ApiExtension(OPENAPI_ROLES, roles),
    ApiForbiddenResponse({
      description: `Not available for your role (needs ${roles.join(' or ')}).`,
    }),
  );

/**
 * Lets a script token with one of these scopes call the route (its owner's role must still
 * fit @Roles). A route without @Scopes refuses every script token with 403.
 */
export const Scopes = (...scopes: ApiTokenScope[]) =>
  applyDecorators(SetMetadata(SCOPES, scopes), ApiExtension(OPENAPI_SCOPES, scopes));

/** Marks a controller as needing sign-in in the OpenAPI document. */
export const SignedIn = () =>
  applyDecorators(ApiBearerAuth(), ApiUnauthorizedResponse({ description: 'Not signed in.' }));

/** The signed-in user, as re-read from the database for this request. */
export const CurrentUser = createParamDecorator(
  (_data: unknown, context: ExecutionContext): User =>
    context.switchToHttp().getRequest<{ user: User }>().user,
);

/** The session of the request's token (for renewal and sign-out). */
export const CurrentSession = createParamDecorator(
  (_data: unknown, context: ExecutionContext): RequestSession =>
    context.switchToHttp().getRequest<{ kinpathSession: RequestSession }>().kinpathSession,
);
