import type { Role } from './roles';

/** Minimum password length for every account (api.md, issue on accounts). */
export const PASSWORD_MIN_LENGTH = 12;

export interface LoginRequest {
  email: string;
  password: string;
}

export interface UserSummary {
  id: string;
  email: string;
  displayName: string;
  role: Role;
  /** Department code for department heads, otherwise null. */
  department: string | null;
}

export interface LoginResponse {
  accessToken: string;
  user: UserSummary;
  /** When this access token expires (ISO 8601); renew it before then with `POST /api/auth/refresh`. */
  expiresAt?: string;
  /** When the session ends for good, whatever the renewals (12 hours after sign-in). */
  sessionExpiresAt?: string;
}

export interface UserRecord extends UserSummary {
  active: boolean;
  createdAt: string;
}

export interface CreateUserRequest {
  email: string;
  displayName: string;
  role: Role;
  department?: string;
  password?: string;
}

export interface HealthResponse {
  status: 'ok' | 'degraded';
  database: 'up' | 'down';
}

/** The error body every route answers with (api.md). */
export interface ApiError {
  statusCode: number;
  message: string | string[];
  error: string;
  /** Facts a client acts on besides the sentence (e.g. an import's detected encoding). */
  details?: Record<string, string>;
}
