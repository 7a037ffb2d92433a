import type { User } from '../users/entities/user.entity';

/**
 * Marks the request's user as acting through a script token. The audit trail reads it, so
 * every action done with a token carries the token's name beside its owner.
 */
export const VIA_API_TOKEN = Symbol('kinpath.viaApiToken');

export interface ApiTokenRef {
  id: string;
  name: string;
}

export type TokenActor = User & { [VIA_API_TOKEN]?: ApiTokenRef };

export function viaApiToken(actor: unknown): ApiTokenRef | undefined {
  if (!actor || typeof actor !== 'object') return undefined;
  return (actor as { [VIA_API_TOKEN]?: ApiTokenRef })[VIA_API_TOKEN];
}
