import axios, { type AxiosError } from 'axios';
import type { ApiError } from '@kinpath/contracts';
import { clearSession, getSession } from '../features/auth/session';

export const LOGIN_URL = '/auth/login';
export const SESSION_ENDED_NOTICE = 'Your session has ended. Sign in again to continue.';

/** The one HTTP client of the web app: every call goes to Kinpath's own API. */
export const apiClient = axios.create({
  baseURL: '/api',
  headers: { Accept: 'application/json' },
  timeout: 60_000,
});

apiClient.interceptors.request.use((config) => {
  const session = getSession();
  if (session) config.headers.set('Authorization', `Bearer ${session.token}`);
  return config;
});

apiClient.interceptors.response.use(
  (response) => response,
  (error: unknown) => {
    // A 401 anywhere but the sign-in call means the token expired or was revoked: end the
    // session, and the route guards take the user back to the sign-in page.
    if (
      axios.isAxiosError(error) &&
      error.response?.status === 401 &&
      error.config?.url !== LOGIN_URL &&
      getSession() !== null
    ) {
      clearSession(SESSION_ENDED_NOTICE);
    }
    return Promise.reject(error);
  },
);

export function httpStatus(error: unknown): number | undefined {
  return axios.isAxiosError(error) ? error.response?.status : undefined;
}

/** The API's own message for an error (api.md: `{ statusCode, message, error }`), if any. */
export function apiMessage(error: unknown): string | undefined {
  if (!axios.isAxiosError(error)) return undefined;
  const body = (error as AxiosError<Partial<ApiError>>).response?.data;
  const message = body && typeof body === 'object' ? body.message : undefined;
  if (Array.isArray(message)) return message.join(' ');
  return typeof message === 'string' && message.length > 0 ? message : undefined;
}

/** The facts an API error carries besides its message (`details`), if any. */
export function apiDetails(error: unknown): Record<string, string> | undefined {
  if (!axios.isAxiosError(error)) return undefined;
  const body = (error as AxiosError<Partial<ApiError>>).response?.data;
  return body && typeof body === 'object' ? body.details : undefined;
}
