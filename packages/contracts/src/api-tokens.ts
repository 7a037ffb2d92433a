/**
 * Script tokens: a secret a script sends as `Authorization: Bearer kp_…` instead of signing
 * in. Each scope opens a fixed set of routes; the token acts with its owner's role.
 */
export const API_TOKEN_SCOPES = [
  'imports:write',
  'imports:read',
  'forecasts:read',
  'courses:read',
  'terms:read',
] as const;
export type ApiTokenScope = (typeof API_TOKEN_SCOPES)[number];

/** What each scope opens, in the words of the screens and docs/api.md. */
export const API_TOKEN_SCOPE_LABELS: Record<ApiTokenScope, string> = {
  'imports:write': 'Upload, commit and roll back term data files',
  'imports:read': 'Read imports and their rejected rows',
  'forecasts:read': 'Read the demand outlook',
  'courses:read': 'Read the course list',
  'terms:read': 'Read the terms',
};

/** Every secret starts with this, so the server tells it from a sign-in token. */
export const API_TOKEN_PREFIX = 'kp_';
export const API_TOKEN_DEFAULT_DAYS = 90;
export const API_TOKEN_MAX_DAYS = 365;
export const API_TOKEN_NAME_MAX_LENGTH = 80;
/** Only these roles may own a script token. */
export const API_TOKEN_OWNER_ROLES = ['admin', 'registrar'] as const;

export interface ApiTokenSummary {
  id: string;
  name: string;
  scopes: ApiTokenScope[];
  ownerId: string;
  ownerEmail: string;
  createdAt: string;
  expiresAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  /** active, or why the token no longer opens anything. */
  state: 'active' | 'expired' | 'revoked';
}

export interface CreateApiTokenRequest {
  name: string;
  scopes: ApiTokenScope[];
  /** ISO date (YYYY-MM-DD); the token works until the end of that day (UTC). */
  expiresOn: string;
  /** Admins only: the registrar or admin the token acts for; default the caller. */
  ownerId?: string;
}

/** The only answer that carries the secret; it is never shown again. */
export interface CreatedApiToken {
  token: ApiTokenSummary;
  secret: string;
}
