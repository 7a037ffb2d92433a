import type { LoginResponse } from '@kinpath/contracts';
import { apiClient } from '../../lib/api-client';
import { getSession, setSession } from './session';

export const REFRESH_URL = '/auth/refresh';
export const LOGOUT_URL = '/auth/logout';

/** Renew when the token has less than this left… */
const RENEW_BEFORE_MS = 5 * 60_000;
/** …and the user did something within this time (an idle tab lets its session lapse). */
const ACTIVE_WITHIN_MS = 15 * 60_000;
const CHECK_EVERY_MS = 30_000;

let lastActivity = Date.now();
const markActive = () => {
  lastActivity = Date.now();
};

function tokenExpiry(token: string, expiresAt: string | undefined): number | null {
  if (expiresAt) {
    const at = Date.parse(expiresAt);
    if (!Number.isNaN(at)) return at;
  }
  try {
    const payload = JSON.parse(atob(token.split('.')[1].replace(/-/g, '+').replace(/_/g, '/')));
    return typeof payload.exp === 'number' ? payload.exp * 1000 : null;
  } catch {
    return null;
  }
}

let renewing: Promise<void> | null = null;

/** Asks for a fresh token for the same session; the server never extends past 12 hours. */
export function renewNow(): Promise<void> {
  renewing ??= (async () => {
    const session = getSession();
    if (!session) return;
    try {
      const { data } = await apiClient.post<LoginResponse>(REFRESH_URL);
      // Still the same sign-in (not ended or replaced meanwhile)?
      if (getSession()?.token === session.token) {
        setSession({ token: data.accessToken, user: data.user, expiresAt: data.expiresAt });
      }
    } catch {
      // A 401 ends the session through the client's handler; other failures retry next tick.
    }
  })().finally(() => {
    renewing = null;
  });
  return renewing;
}

/** Keeps an active user's session alive; returns the function that stops it. */
export function startRenewal(): () => void {
  const events = ['pointerdown', 'keydown', 'wheel', 'touchstart'] as const;
  for (const name of events) window.addEventListener(name, markActive, { passive: true });
  const timer = window.setInterval(() => {
    const session = getSession();
    if (!session) return;
    const expiry = tokenExpiry(session.token, session.expiresAt);
    if (expiry === null || expiry - Date.now() > RENEW_BEFORE_MS) return;
    if (Date.now() - lastActivity > ACTIVE_WITHIN_MS || expiry <= Date.now()) return;
    void renewNow();
  }, CHECK_EVERY_MS);
  return () => {
    window.clearInterval(timer);
    for (const name of events) window.removeEventListener(name, markActive);
  };
}

/** Ends the session on the server too, so the token stops working at once. */
export async function signOutOnServer(token: string): Promise<void> {
  try {
    await apiClient.post(LOGOUT_URL, undefined, { headers: { Authorization: `Bearer ${token}` } });
  } catch {
    // Signed out locally all the same; the token expires within 15 minutes at most.
  }
}
