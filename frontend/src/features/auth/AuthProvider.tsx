import {
  createContext,
  useCallback,
  useContext,
  useEffect,
  useMemo,
  useSyncExternalStore,
} from 'react';
import type { ReactNode } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import type { LoginResponse, UserSummary } from '@kinpath/contracts';
import { signOutOnServer, startRenewal } from './renewal';
import { clearSession, getSession, setSession, subscribeToSession } from './session';

export interface AuthState {
  user: UserSummary | null;
  signIn: (response: LoginResponse) => void;
  signOut: () => void;
}

const AuthContext = createContext<AuthState | null>(null);

export function AuthProvider({ children }: { children: ReactNode }) {
  const queryClient = useQueryClient();
  const session = useSyncExternalStore(subscribeToSession, getSession, getSession);

  const signIn = useCallback(
    (response: LoginResponse) => {
      // Nothing cached for a previous user may show through to the next one.
      queryClient.clear();
      setSession({
        token: response.accessToken,
        user: response.user,
        expiresAt: response.expiresAt,
      });
    },
    [queryClient],
  );

  const signOut = useCallback(() => {
    const token = getSession()?.token;
    clearSession();
    queryClient.clear();
    // The server ends the session too, so its token stops working at once.
    if (token) void signOutOnServer(token);
  }, [queryClient]);

  const signedIn = session !== null;
  useEffect(() => (signedIn ? startRenewal() : undefined), [signedIn]);

  const value = useMemo<AuthState>(
    () => ({ user: session?.user ?? null, signIn, signOut }),
    [session, signIn, signOut],
  );

  return <AuthContext.Provider value={value}>{children}</AuthContext.Provider>;
}

export function useAuth(): AuthState {
  const state = useContext(AuthContext);
  if (!state) throw new Error('useAuth must be used inside <AuthProvider>.');
  return state;
}
