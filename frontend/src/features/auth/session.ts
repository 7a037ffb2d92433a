import { ROLES, type UserSummary } from '@kinpath/contracts';

/** What a signed-in browser tab holds: the bearer token and who it belongs to. */
export interface Session {
  token: string;
  user: UserSummary;
  /** When the access token expires (ISO 8601); renewed before then while the user is active. */
  expiresAt?: string;
}

// sessionStorage, not localStorage: a session ends with the tab, which suits shared office desks.
const SESSION_KEY = 'kinpath.session';
const NOTICE_KEY = 'kinpath.sign-in-notice';

type Listener = () => void;
const listeners = new Set<Listener>();

function isSession(value: unknown): value is Session {
  if (typeof value !== 'object' || value === null) return false;
  const { token, user } = value as Partial<Session>;
  return (
    typeof token === 'string' &&
    token.length > 0 &&
    typeof user === 'object' &&
    user !== null &&
    typeof user.email === 'string' &&
    (ROLES as readonly string[]).includes(user.role)
  );
}

function readStored(): Session | null {
  try {
    const raw = window.sessionStorage.getItem(SESSION_KEY);
    const parsed: unknown = raw ? JSON.parse(raw) : null;
    return isSession(parsed) ? parsed : null;
  } catch {
    // Unreadable storage counts as signed out.
    return null;
  }
}

let current: Session | null = readStored();

function emit(): void {
  for (const listener of listeners) listener();
}

export function getSession(): Session | null {
  return current;
}

export function setSession(session: Session): void {
  current = session;
  window.sessionStorage.setItem(SESSION_KEY, JSON.stringify(session));
  window.sessionStorage.removeItem(NOTICE_KEY);
  emit();
}

/** Ends the session; `notice` is shown once on the sign-in page (e.g. why the session ended). */
export function clearSession(notice?: string): void {
  current = null;
  window.sessionStorage.removeItem(SESSION_KEY);
  if (notice) window.sessionStorage.setItem(NOTICE_KEY, notice);
  emit();
}

export function readSignInNotice(): string | null {
  return window.sessionStorage.getItem(NOTICE_KEY);
}

export function dismissSignInNotice(): void {
  window.sessionStorage.removeItem(NOTICE_KEY);
}

export function subscribeToSession(listener: Listener): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}
